import type { Request } from 'express';

const COOKIE = 'pw.csrf';

function cookieValue(req: Request, name: string): string | undefined {
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return undefined;
}

/**
 * Where the CSRF token lives: in the session once someone is signed in, before that in an http-only cookie of
 * its own, so an anonymous visitor asking for a token stores no session row.
 */
export function csrfState(secure: boolean) {
  return {
    getTokenFromState(req: Request): string | undefined {
      return (req.session?.csrfToken as string | undefined) ?? cookieValue(req, COOKIE);
    },
    storeTokenInState(req: Request, token?: string | null) {
      if (req.user && req.session) {
        req.session.csrfToken = token;
        return;
      }
      if (token == null) req.res?.clearCookie(COOKIE, { path: '/' });
      else req.res?.cookie(COOKIE, token, { httpOnly: true, sameSite: 'lax', secure, path: '/' });
    },
  };
}
