function withRedirect(path: string, redirectTo?: string | null) {
  return redirectTo && redirectTo !== '/' ? `${path}?redirectTo=${encodeURIComponent(redirectTo)}` : path;
}

export const paths = {
  home: {
    path: '/',
    getHref: () => '/',
  },
  auth: {
    signIn: {
      path: '/sign-in',
      getHref: (redirectTo?: string | null) => withRedirect('/sign-in', redirectTo),
    },
    signUp: {
      path: '/sign-up',
      getHref: () => '/sign-up',
    },
    forgotPassword: {
      path: '/forgot-password',
      getHref: () => '/forgot-password',
    },
    resetPassword: {
      path: '/reset-password',
      getHref: () => '/reset-password',
    },
    welcome: {
      path: '/welcome',
      getHref: () => '/welcome',
    },
  },
  projects: {
    detail: {
      path: '/projects/:projectId',
      getHref: (projectId: number | string) => `/projects/${projectId}`,
    },
    members: {
      path: '/projects/:projectId/members',
      getHref: (projectId: number | string) => `/projects/${projectId}/members`,
    },
    design: {
      path: '/projects/:projectId/design',
      getHref: (projectId: number | string, from?: number | null) =>
        `/projects/${projectId}/design${from ? `?from=${from}` : ''}`,
    },
    revisions: {
      path: '/projects/:projectId/revisions',
      getHref: (projectId: number | string) => `/projects/${projectId}/revisions`,
    },
    compareRevisions: {
      path: '/projects/:projectId/revisions/compare',
      getHref: (projectId: number | string, a: number, b: number) => `/projects/${projectId}/revisions/compare?a=${a}&b=${b}`,
    },
    runs: {
      path: '/projects/:projectId/runs',
      getHref: (projectId: number | string) => `/projects/${projectId}/runs`,
    },
    compareRuns: {
      path: '/projects/:projectId/runs/compare',
      getHref: (projectId: number | string, a?: number | null, b?: number | null) => {
        const search = new URLSearchParams();
        if (a) search.set('a', String(a));
        if (b) search.set('b', String(b));
        const query = search.toString();
        return `/projects/${projectId}/runs/compare${query ? `?${query}` : ''}`;
      },
    },
    run: {
      path: '/projects/:projectId/runs/:runId',
      getHref: (projectId: number | string, runId: number | string) => `/projects/${projectId}/runs/${runId}`,
    },
    runLayout: {
      path: '/projects/:projectId/runs/:runId/layout',
      getHref: (projectId: number | string, runId: number | string) => `/projects/${projectId}/runs/${runId}/layout`,
    },
    runReport: {
      path: '/projects/:projectId/runs/:runId/report',
      getHref: (projectId: number | string, runId: number | string) => `/projects/${projectId}/runs/${runId}/report`,
    },
    atomLibraries: {
      path: '/projects/:projectId/atom-libraries',
      getHref: (projectId: number | string) => `/projects/${projectId}/atom-libraries`,
    },
    atomLibrary: {
      path: '/projects/:projectId/atom-libraries/:libraryId',
      getHref: (projectId: number | string, libraryId: number | string) => `/projects/${projectId}/atom-libraries/${libraryId}`,
    },
    libraryBuild: {
      path: '/projects/:projectId/atom-libraries/builds/:buildId',
      getHref: (projectId: number | string, buildId: number | string) => `/projects/${projectId}/atom-libraries/builds/${buildId}`,
    },
  },
  shared: {
    path: '/shared/:token',
    getHref: (token: string) => `/shared/${token}`,
  },
  settings: {
    path: '/settings',
    getHref: () => '/settings',
  },
  admin: {
    path: '/admin',
    getHref: () => '/admin',
  },
  audit: {
    path: '/admin/audit',
    getHref: () => '/admin/audit',
  },
} as const;

/** Accepts only in-app paths so a crafted `redirectTo` cannot send the user to another site. */
export function safeRedirect(target: string | null | undefined, fallback: string = paths.home.getHref()): string {
  if (!target || !target.startsWith('/') || target.startsWith('//') || target.startsWith('/\\')) return fallback;
  return target;
}
