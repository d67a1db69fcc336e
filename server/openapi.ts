import { z } from 'zod';
import { createAccessTokenSchema, createShareLinkSchema } from '../shared/schemas/access';
import { createUserSchema, updateUserSchema } from '../shared/schemas/admin';
import { listAuditQuerySchema } from '../shared/schemas/audit';
import { createAtomLibrarySchema } from '../shared/schemas/atom-libraries';
import {
  acceptInvitationSchema,
  changePasswordSchema,
  resetPasswordSchema,
  resetRequestSchema,
  signInSchema,
  signUpSchema,
  updateProfileSchema,
} from '../shared/schemas/auth';
import { exportOverrideSchema, fabPackageQuerySchema, layoutRegionQuerySchema, projectDesignRulesSchema } from '../shared/schemas/fab';
import {
  addMemberSchema,
  changeMemberRoleSchema,
  createProjectSchema,
  listProjectsQuerySchema,
  updateProjectSchema,
} from '../shared/schemas/projects';
import {
  createCommentSchema,
  createThreadSchema,
  listNotificationsQuerySchema,
  notificationPreferencesSchema,
  updateCommentSchema,
} from '../shared/schemas/review';
import { compareRevisionsQuerySchema, createRevisionSchema } from '../shared/schemas/revisions';
import { comparePictureQuerySchema, compareRunsQuerySchema } from '../shared/schemas/run-comparison';
import { listRunsQuerySchema } from '../shared/schemas/runs';
import { toleranceRequestSchema } from '../shared/schemas/tolerance';
import { libraryBuildRequestSchema, libraryEstimateRequestSchema } from '../shared/schemas/library-builds';
import { createUploadSchema } from '../shared/schemas/uploads';

/** Who may call a route: anyone, any signed-in user, a site admin, a session (not a token), or a project role. */
export type RouteRole = 'public' | 'user' | 'session' | 'admin' | 'project:read' | 'project:comment' | 'project:design' | 'project:manage';

export interface ApiRoute {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** Below `/api`, with Express-style `:params`. */
  path: string;
  summary: string;
  role: RouteRole;
  /** JSON body (or multipart fields, see `multipart`). */
  body?: z.ZodType;
  query?: z.ZodType;
  multipart?: boolean;
  /** Status of success and what it answers with. */
  ok: [number, string];
}

const P = '/projects/:projectId';

/** Every route of the API. tests/api/openapi.test.ts checks this against the app's router. */
export const API_ROUTES: ApiRoute[] = [
  { method: 'get', path: '/health', summary: 'Health: database ping (own short time limit), run queue and input pool; 503 with the same details when not ok', role: 'public', ok: [200, '`{ ok, database: { ok, ms, error? }, runQueue, inputs }`'] },
  { method: 'get', path: '/openapi.json', summary: 'This document', role: 'public', ok: [200, 'OpenAPI 3.1 document'] },

  { method: 'get', path: '/auth/csrf', summary: 'CSRF token for cookie sessions (send it as x-csrf-token)', role: 'public', ok: [200, '`{ csrfToken }`'] },
  { method: 'get', path: '/auth/me', summary: 'The signed-in user, if any', role: 'public', ok: [200, '`{ user | null, signupOpen }`'] },
  { method: 'post', path: '/auth/sign-in', summary: 'Sign in with e-mail and password (starts a session)', role: 'public', body: signInSchema, ok: [200, '`{ user, csrfToken }`'] },
  { method: 'post', path: '/auth/sign-out', summary: 'End the session', role: 'public', ok: [200, '`{ ok, csrfToken }`'] },
  { method: 'post', path: '/auth/sign-up', summary: 'Ask for an account (when open sign-up is on); the link to choose a password arrives by e-mail', role: 'public', body: signUpSchema, ok: [202, '`{ message }`, the same for every address'] },
  { method: 'post', path: '/auth/password-reset/request', summary: 'Mail a password reset link', role: 'public', body: resetRequestSchema, ok: [202, '`{ message }`'] },
  { method: 'post', path: '/auth/password-reset/complete', summary: 'Set a new password with a reset link token; ends the account\'s other sessions and revokes its access tokens', role: 'public', body: resetPasswordSchema, ok: [200, '`{ user, csrfToken, revokedTokens }`'] },
  { method: 'post', path: '/auth/invitation/accept', summary: 'Accept an invitation: choose name and password, get signed in', role: 'public', body: acceptInvitationSchema, ok: [200, '`{ user, csrfToken }`'] },
  { method: 'post', path: '/auth/password', summary: 'Change your password; ends your other sessions and revokes your access tokens', role: 'user', body: changePasswordSchema, ok: [200, '`{ ok, revokedTokens, csrfToken }`'] },
  { method: 'patch', path: '/auth/profile', summary: 'Change your display name', role: 'user', body: updateProfileSchema, ok: [200, '`{ user }`'] },

  { method: 'get', path: '/access-tokens', summary: 'Your personal access tokens (never the secrets)', role: 'session', ok: [200, '`{ accessTokens: AccessToken[] }`'] },
  { method: 'post', path: '/access-tokens', summary: 'Create a personal access token; the secret is in this answer only', role: 'session', body: createAccessTokenSchema, ok: [201, '`{ accessToken, token }`'] },
  { method: 'delete', path: '/access-tokens/:tokenId', summary: 'Revoke one of your tokens', role: 'session', ok: [200, '`{ accessToken }`'] },

  { method: 'get', path: '/shared/:token', summary: 'The run behind a share link (no account needed)', role: 'public', ok: [200, '`{ projectName, expiresAt, run: RunDetail }`; 404 unknown, 410 revoked or expired'] },
  { method: 'get', path: '/shared/:token/artifacts/:name', summary: 'A file of the shared run', role: 'public', ok: [200, 'The file'] },
  { method: 'get', path: '/shared/:token/tiles/:picture', summary: 'The tile pyramid of a preview of the shared run', role: 'public', ok: [200, '`{ tiles: TilePyramid }`; 404 without one'] },
  { method: 'get', path: '/shared/:token/tiles/:picture/:level/:x/:y', summary: 'One tile of a preview of the shared run', role: 'public', ok: [200, 'PNG; 400 bad numbers, 404 outside the pyramid'] },

  { method: 'get', path: '/projects', summary: 'Your projects', role: 'user', query: listProjectsQuerySchema, ok: [200, '`{ projects: Project[] }`'] },
  { method: 'post', path: '/projects', summary: 'Create a project (you become its owner)', role: 'user', body: createProjectSchema, ok: [201, '`{ project }`'] },
  { method: 'get', path: P, summary: 'One project', role: 'project:read', ok: [200, '`{ project }`'] },
  { method: 'patch', path: P, summary: 'Rename or describe a project', role: 'project:manage', body: updateProjectSchema, ok: [200, '`{ project }`'] },
  { method: 'post', path: `${P}/archive`, summary: 'Archive a project', role: 'project:manage', ok: [200, '`{ project }`'] },
  { method: 'post', path: `${P}/unarchive`, summary: 'Bring an archived project back', role: 'project:manage', ok: [200, '`{ project }`'] },
  { method: 'get', path: `${P}/members`, summary: 'Members and their roles', role: 'project:read', ok: [200, '`{ members: Member[] }`'] },
  { method: 'post', path: `${P}/members`, summary: 'Add a member by e-mail; an e-mail without an account gets an invitation when a site admin adds it or sign-up is open', role: 'project:manage', body: addMemberSchema, ok: [201, '`{ member, invited }`'] },
  { method: 'patch', path: `${P}/members/:userId`, summary: "Change a member's role", role: 'project:manage', body: changeMemberRoleSchema, ok: [200, '`{ member }`'] },
  { method: 'delete', path: `${P}/members/:userId`, summary: 'Remove a member (owners), or leave (anyone)', role: 'project:read', ok: [204, 'No content'] },
  { method: 'get', path: `${P}/invitations`, summary: 'Members invited by e-mail who have not accepted yet', role: 'project:manage', ok: [200, '`{ invitations: PendingInvitation[] }`'] },
  { method: 'post', path: `${P}/invitations/:userId/resend`, summary: 'Mail the invitation again with a new link (earlier links stop working)', role: 'project:manage', ok: [200, '`{ invitation }`'] },
  { method: 'delete', path: `${P}/invitations/:userId`, summary: 'Withdraw an invitation: links refused, membership removed', role: 'project:manage', ok: [204, 'No content'] },

  { method: 'get', path: `${P}/revisions`, summary: 'Revisions of the design', role: 'project:read', ok: [200, '`{ revisions }`'] },
  { method: 'post', path: `${P}/revisions`, summary: 'Save the design as a new immutable revision', role: 'project:design', body: createRevisionSchema, ok: [201, '`{ revision }`'] },
  { method: 'get', path: `${P}/revisions/compare`, summary: 'Two revisions side by side', role: 'project:read', query: compareRevisionsQuerySchema, ok: [200, 'Comparison'] },
  { method: 'get', path: `${P}/revisions/:number`, summary: 'One revision with its design', role: 'project:read', ok: [200, '`{ revision }`'] },

  { method: 'get', path: `${P}/uploads`, summary: 'Uploaded images and phase maps', role: 'project:read', ok: [200, '`{ uploads }`'] },
  { method: 'post', path: `${P}/uploads`, summary: 'Upload an image or phase map (multipart: kind, file)', role: 'project:design', body: createUploadSchema, multipart: true, ok: [201, '`{ upload }`'] },
  { method: 'get', path: `${P}/uploads/:uploadId/content`, summary: 'The uploaded file', role: 'project:read', ok: [200, 'The file'] },
  { method: 'delete', path: `${P}/uploads/:uploadId`, summary: 'Delete an upload (frees project storage)', role: 'project:design', ok: [204, 'No content'] },

  { method: 'get', path: `${P}/atom-libraries`, summary: 'Atom libraries usable in the project', role: 'project:read', ok: [200, '`{ atomLibraries }`'] },
  { method: 'post', path: `${P}/atom-libraries`, summary: 'Upload an atom library (multipart: fields and CSV file)', role: 'project:design', body: createAtomLibrarySchema, multipart: true, ok: [201, '`{ atomLibrary }`'] },
  { method: 'get', path: `${P}/atom-libraries/:libraryId`, summary: 'One atom library with its atoms', role: 'project:read', ok: [200, '`{ atomLibrary }`'] },
  { method: 'get', path: `${P}/atom-libraries/:libraryId/csv`, summary: 'The library as CSV', role: 'project:read', ok: [200, 'CSV file'] },
  { method: 'delete', path: `${P}/atom-libraries/:libraryId`, summary: 'Delete an unused library (its uploader or an owner)', role: 'project:design', ok: [204, 'No content'] },
  { method: 'post', path: `${P}/atom-libraries/:libraryId/share`, summary: 'Share your personal library with the project (only its owner)', role: 'project:design', ok: [200, '`{ atomLibrary }`'] },
  { method: 'delete', path: `${P}/atom-libraries/:libraryId/share`, summary: 'Stop sharing your personal library with the project', role: 'project:design', ok: [200, '`{ atomLibrary }`'] },

  { method: 'post', path: `${P}/library-builds/estimate`, summary: 'Cost of a library build (a formula: atoms × time per atom), with lattice-diffraction warnings', role: 'project:design', body: libraryEstimateRequestSchema, ok: [200, '`{ atoms, harmonics, secondsPerAtom, seconds, basis, warnings }`'] },
  { method: 'post', path: `${P}/library-builds`, summary: 'Compute an atom library by RCWA on the run workers (counts as a run for the quotas)', role: 'project:design', body: libraryBuildRequestSchema, ok: [202, '`{ build: LibraryBuild }`'] },
  { method: 'get', path: `${P}/library-builds`, summary: 'Library builds of the project (and your personal ones), newest first', role: 'project:read', ok: [200, '`{ builds: LibraryBuild[] }`'] },
  { method: 'get', path: `${P}/library-builds/:buildId`, summary: 'One library build with its progress and, once done, its result for the plots', role: 'project:read', ok: [200, '`{ build: LibraryBuild, result: LibraryBuildResult | null }`'] },
  { method: 'post', path: `${P}/library-builds/:buildId/cancel`, summary: 'Cancel a queued or running library build', role: 'project:design', ok: [200, '`{ build }`'] },

  { method: 'post', path: `${P}/revisions/:number/runs`, summary: 'Start a run of a revision', role: 'project:design', ok: [202, '`{ run: RunDetail }`'] },
  { method: 'get', path: `${P}/runs`, summary: 'Runs of the project', role: 'project:read', query: listRunsQuerySchema, ok: [200, '`{ runs: RunSummary[] }`'] },
  { method: 'get', path: `${P}/runs/compare`, summary: 'Two runs of the project side by side: summaries, every metric with Δ and %, the far fields’ common brightness scales', role: 'project:read', query: compareRunsQuerySchema, ok: [200, '`{ comparison: RunComparison }`'] },
  { method: 'get', path: `${P}/runs/compare/far-field.png`, summary: 'One far-field picture of a comparison (run a, run b or the difference b − a) on the common scale', role: 'project:read', query: comparePictureQuerySchema, ok: [200, 'image/png'] },
  { method: 'get', path: `${P}/runs/:runId`, summary: 'One run with metrics, plots and file list', role: 'project:read', ok: [200, '`{ run: RunDetail }`'] },
  { method: 'post', path: `${P}/runs/:runId/cancel`, summary: 'Cancel a queued or running run', role: 'project:design', ok: [200, '`{ run }`'] },
  { method: 'delete', path: `${P}/runs/:runId/files`, summary: 'Delete a finished run’s files (the run, its metrics and events stay)', role: 'project:design', ok: [200, '`{ run }` with filesDeletedAt'] },
  { method: 'get', path: `${P}/runs/:runId/artifacts/:name`, summary: 'A file of a run', role: 'project:read', ok: [200, 'The file'] },
  { method: 'get', path: `${P}/runs/:runId/tiles/:picture`, summary: 'The tile pyramid of a preview (README "Tile pyramids"): size, tile size, levels', role: 'project:read', ok: [200, '`{ tiles: TilePyramid }`; 404 without one'] },
  { method: 'get', path: `${P}/runs/:runId/tiles/:picture/:level/:x/:y`, summary: 'One 256-px tile of a preview (level 0 = full resolution; x, y from the top left)', role: 'project:read', ok: [200, 'PNG; 400 bad numbers, 404 outside the pyramid'] },
  { method: 'get', path: `${P}/runs/:runId/events`, summary: 'Server-Sent Events following a run (at most EVENT_STREAMS_PER_USER open per person)', role: 'project:read', ok: [200, 'text/event-stream of `update` events, and `end` when access was lost'] },
  { method: 'post', path: `${P}/runs/:runId/tolerance`, summary: 'Start a tolerance study of a finished run', role: 'project:design', body: toleranceRequestSchema, ok: [202, '`{ study }`'] },
  { method: 'get', path: `${P}/runs/:runId/tolerance`, summary: 'Tolerance studies of a run', role: 'project:read', ok: [200, '`{ studies }`'] },

  { method: 'get', path: `${P}/design-rules`, summary: 'Design rules of the project', role: 'project:read', ok: [200, 'Design rules'] },
  { method: 'put', path: `${P}/design-rules`, summary: 'Change the design rules', role: 'project:manage', body: projectDesignRulesSchema, ok: [200, 'Design rules'] },
  { method: 'get', path: `${P}/runs/:runId/layout`, summary: 'Pillars and violations of a layout region', role: 'project:read', query: layoutRegionQuerySchema, ok: [200, 'LayoutRegion'] },
  { method: 'get', path: `${P}/runs/:runId/design-check`, summary: 'Design-rule check of a run', role: 'project:read', ok: [200, '`{ check }`'] },
  { method: 'get', path: `${P}/runs/:runId/report`, summary: 'Data of the print-friendly report', role: 'project:read', ok: [200, '`{ report }`'] },
  { method: 'post', path: `${P}/runs/:runId/export-override`, summary: 'Record a reason to export despite violations', role: 'project:manage', body: exportOverrideSchema, ok: [201, '`{ override, check }`'] },
  { method: 'get', path: `${P}/runs/:runId/fab-package.zip`, summary: 'The fab package (zip)', role: 'project:read', query: fabPackageQuerySchema, ok: [200, 'application/zip'] },

  { method: 'get', path: `${P}/runs/:runId/share-links`, summary: 'Share links of a run', role: 'project:manage', ok: [200, '`{ shareLinks: ShareLink[] }`'] },
  { method: 'post', path: `${P}/runs/:runId/share-links`, summary: 'Create a read-only share link of a run; the token is in this answer only', role: 'project:manage', body: createShareLinkSchema, ok: [201, '`{ shareLink, token, url }`'] },
  { method: 'delete', path: `${P}/share-links/:linkId`, summary: 'Revoke a share link', role: 'project:manage', ok: [200, '`{ shareLink }`'] },

  { method: 'get', path: `${P}/activity`, summary: 'Activity feed of the project', role: 'project:read', ok: [200, '`{ activity }`'] },
  { method: 'get', path: `${P}/runs/:runId/threads`, summary: 'Comment threads pinned on the run’s previews', role: 'project:read', ok: [200, '`{ threads }`'] },
  { method: 'post', path: `${P}/runs/:runId/threads`, summary: 'Pin a new comment thread on a preview', role: 'project:comment', body: createThreadSchema, ok: [201, '`{ thread }`'] },
  { method: 'post', path: `${P}/runs/:runId/threads/:threadId/comments`, summary: 'Reply in a thread', role: 'project:comment', body: createCommentSchema, ok: [201, '`{ comment }`'] },
  { method: 'post', path: `${P}/runs/:runId/threads/:threadId/resolve`, summary: 'Resolve a thread', role: 'project:comment', ok: [200, '`{ thread }`'] },
  { method: 'post', path: `${P}/runs/:runId/threads/:threadId/reopen`, summary: 'Reopen a thread', role: 'project:comment', ok: [200, '`{ thread }`'] },
  { method: 'patch', path: `${P}/runs/:runId/threads/:threadId/comments/:commentId`, summary: 'Edit your comment', role: 'project:comment', body: updateCommentSchema, ok: [200, '`{ comment }`'] },
  { method: 'delete', path: `${P}/runs/:runId/threads/:threadId/comments/:commentId`, summary: 'Delete your comment (owners: any)', role: 'project:comment', ok: [204, 'No content'] },

  { method: 'get', path: '/notifications', summary: 'Your notifications', role: 'user', query: listNotificationsQuerySchema, ok: [200, 'Notifications and unread count'] },
  { method: 'post', path: '/notifications/read-all', summary: 'Mark all your notifications read', role: 'user', ok: [204, 'No content'] },
  { method: 'post', path: '/notifications/:notificationId/read', summary: 'Mark one notification read', role: 'user', ok: [204, 'No content'] },
  { method: 'get', path: '/notifications/preferences', summary: 'Which notifications reach you by e-mail', role: 'user', ok: [200, '`{ preferences }`'] },
  { method: 'put', path: '/notifications/preferences', summary: 'Choose which notifications reach you by e-mail', role: 'user', body: notificationPreferencesSchema, ok: [200, '`{ preferences }`'] },

  { method: 'get', path: '/admin/users', summary: 'All accounts', role: 'admin', ok: [200, '`{ users }`'] },
  { method: 'post', path: '/admin/users', summary: 'Invite a new account by e-mail', role: 'admin', body: createUserSchema, ok: [201, '`{ user }`'] },
  { method: 'patch', path: '/admin/users/:userId', summary: 'Change role or disable an account', role: 'admin', body: updateUserSchema, ok: [200, '`{ user }`'] },
  { method: 'get', path: '/admin/run-queue', summary: 'The run queue: engine, this process\'s state and, with RUN_QUEUE=redis, BullMQ\'s job counts per state (null when Redis does not answer)', role: 'admin', ok: [200, '`{ engine, state, counts }`'] },
  { method: 'get', path: '/admin/audit', summary: 'Security events, newest first (filter by account and kind)', role: 'admin', query: listAuditQuerySchema, ok: [200, '`{ events, total, page, pageSize }`'] },
];

const ROLE_TEXT: Record<RouteRole, string> = {
  public: 'No account needed.',
  user: 'Any signed-in user (session or token).',
  session: 'A signed-in browser session; access tokens are refused (403).',
  admin: 'Site admins only.',
  'project:read': 'Any member of the project (owner, designer, reviewer, viewer).',
  'project:comment': 'Project owner, designer or reviewer.',
  'project:design': 'Project owner or designer.',
  'project:manage': 'Project owner.',
};

/** Input schemas as JSON Schema, taking what the API accepts (the input side of defaults and transforms). */
function jsonSchema(schema: z.ZodType) {
  const { $schema: _dialect, ...rest } = z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any' }) as Record<string, unknown>;
  return rest;
}

/** The OpenAPI 3.1 document of the API, generated from the route table and the shared zod schemas. */
export function openApiDocument(serverUrl: string) {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const route of API_ROUTES) {
    const openPath = `/api${route.path.replace(/:([A-Za-z]+)/g, '{$1}')}`;
    const parameters: unknown[] = [...route.path.matchAll(/:([A-Za-z]+)/g)].map((m) => ({
      name: m[1],
      in: 'path',
      required: true,
      schema: { type: 'string' },
    }));
    if (route.query) {
      const query = jsonSchema(route.query) as { properties?: Record<string, unknown>; required?: string[] };
      for (const [name, schema] of Object.entries(query.properties ?? {})) {
        parameters.push({ name, in: 'query', required: query.required?.includes(name) ?? false, schema });
      }
    }
    const secured = route.role !== 'public';
    const [status, description] = route.ok;
    paths[openPath] ??= {};
    paths[openPath][route.method] = {
      summary: route.summary,
      description: ROLE_TEXT[route.role],
      ...(parameters.length ? { parameters } : {}),
      ...(route.body
        ? { requestBody: { required: true, content: { [route.multipart ? 'multipart/form-data' : 'application/json']: { schema: jsonSchema(route.body) } } } }
        : {}),
      ...(secured ? { security: route.role === 'session' ? [{ session: [] }] : [{ session: [] }, { bearer: [] }] } : {}),
      responses: {
        [String(status)]: { description },
        ...(secured ? { '401': { description: 'Not signed in, or the access token is unknown, revoked or expired' } } : {}),
        ...(secured ? { '403': { description: 'Your role does not allow this, or a read-only token was used to write' } } : {}),
        ...(route.body || route.query ? { '400': { description: 'Invalid input; `details` names each bad field' } } : {}),
      },
    };
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Phasewright API',
      version: '1',
      description:
        'Design, run and review polarization-multiplexed metasurfaces. Authenticate with a browser session (cookie + x-csrf-token header on writes) or with a personal access token: `Authorization: Bearer pwt_…` (no CSRF header needed). Errors are JSON `{ error, details? }`.',
    },
    servers: [{ url: serverUrl }],
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'pw.sid' },
        bearer: { type: 'http', scheme: 'bearer', description: 'Personal access token from Settings; "read" scope allows GET only' },
      },
    },
    paths,
  };
}
