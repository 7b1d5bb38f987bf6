// Every route handler in app/api with the roles allowed to call it. tests/e2e/permissions.spec.ts
// fails when a route file or method exists that is not listed here: add new routes to this table.
export type Role = 'admin' | 'lead' | 'rater' | 'observer';
export type RouteCase = {
  file: string; // relative to app/api
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  url: string; // a sample address for the walk
  allowed: Role[] | 'public' | 'skip';
};

const ALL: Role[] = ['admin', 'lead', 'rater', 'observer'];

export const ROUTES: RouteCase[] = [
  { file: 'health/route.ts', method: 'GET', url: '/api/health', allowed: 'public' },
  { file: 'me/route.ts', method: 'GET', url: '/api/me', allowed: ALL },
  { file: 'account/password/route.ts', method: 'POST', url: '/api/account/password', allowed: ALL },
  { file: 'admin/users/route.ts', method: 'GET', url: '/api/admin/users', allowed: ['admin'] },
  // people: invitations, password resets, facility admin, audit log, storage, development mailbox
  { file: 'admin/users/[id]/route.ts', method: 'PATCH', url: '/api/admin/users/999999', allowed: ['admin'] },
  { file: 'admin/users/[id]/sessions/route.ts', method: 'DELETE', url: '/api/admin/users/999999/sessions', allowed: ['admin'] },
  { file: 'admin/audit/route.ts', method: 'GET', url: '/api/admin/audit', allowed: ['admin'] },
  { file: 'admin/audit/export/route.ts', method: 'GET', url: '/api/admin/audit/export?from=2999-01-01', allowed: ['admin'] },
  { file: 'admin/storage/route.ts', method: 'GET', url: '/api/admin/storage', allowed: ['admin'] },
  { file: 'invitations/route.ts', method: 'GET', url: '/api/invitations', allowed: ['admin', 'lead'] },
  { file: 'invitations/route.ts', method: 'POST', url: '/api/invitations', allowed: ['admin', 'lead'] },
  { file: 'invitations/[id]/route.ts', method: 'DELETE', url: '/api/invitations/999999', allowed: ['admin', 'lead'] },
  { file: 'invitations/accept/route.ts', method: 'POST', url: '/api/invitations/accept', allowed: 'public' },
  { file: 'password-reset/route.ts', method: 'POST', url: '/api/password-reset', allowed: 'public' },
  { file: 'password-reset/complete/route.ts', method: 'POST', url: '/api/password-reset/complete', allowed: 'public' },
  { file: 'dev/mailbox/route.ts', method: 'GET', url: '/api/dev/mailbox', allowed: ['admin'] },
  { file: 'studies/[id]/agreement/route.ts', method: 'GET', url: '/api/studies/1/agreement', allowed: ['admin', 'lead', 'observer'] },
  { file: 'studies/[id]/reconcile/route.ts', method: 'GET', url: '/api/studies/1/reconcile', allowed: ['admin', 'lead'] },
  { file: 'studies/[id]/decisions/route.ts', method: 'POST', url: '/api/studies/1/decisions', allowed: ['admin', 'lead'] },
  // calibration set: leads of the study (and admins) mark runs, set references, assign and certify; a rater reads their own score
  { file: 'studies/[id]/calibration/route.ts', method: 'GET', url: '/api/studies/1/calibration', allowed: ['admin', 'lead'] },
  {
    file: 'studies/[id]/calibration/runs/route.ts',
    method: 'POST',
    url: '/api/studies/999999/calibration/runs',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/runs/[runId]/references/route.ts',
    method: 'POST',
    url: '/api/studies/999999/calibration/runs/999999/references',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/runs/[runId]/raters/route.ts',
    method: 'POST',
    url: '/api/studies/999999/calibration/runs/999999/raters',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/certifications/route.ts',
    method: 'POST',
    url: '/api/studies/999999/calibration/certifications',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/runs/[runId]/route.ts',
    method: 'DELETE',
    url: '/api/studies/999999/calibration/runs/999999',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/threshold/route.ts',
    method: 'GET',
    url: '/api/studies/999999/calibration/threshold',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/calibration/threshold/route.ts',
    method: 'PUT',
    url: '/api/studies/999999/calibration/threshold',
    allowed: ['admin', 'lead'],
  },
  { file: 'studies/[id]/calibration/me/route.ts', method: 'GET', url: '/api/studies/1/calibration/me', allowed: ['admin', 'rater'] },
  {
    file: 'reconcile/runs/[runId]/components/route.ts',
    method: 'GET',
    url: '/api/reconcile/runs/999999/components',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'reconcile/runs/[runId]/files/[file]/route.ts',
    method: 'GET',
    url: '/api/reconcile/runs/999999/files/mean.nii.gz',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'reconcile/runs/[runId]/maps/[part]/route.ts',
    method: 'GET',
    url: '/api/reconcile/runs/999999/maps/layout',
    allowed: ['admin', 'lead'],
  },
  // studies, members, runs and uploads (mutations use study/run 999999 so the walk changes nothing)
  { file: 'studies/route.ts', method: 'GET', url: '/api/studies', allowed: ALL },
  { file: 'studies/route.ts', method: 'POST', url: '/api/studies', allowed: ['admin', 'lead'] },
  { file: 'studies/[id]/route.ts', method: 'GET', url: '/api/studies/1', allowed: ALL },
  { file: 'studies/[id]/route.ts', method: 'PATCH', url: '/api/studies/999999', allowed: ['admin', 'lead'] },
  { file: 'studies/[id]/members/route.ts', method: 'GET', url: '/api/studies/1/members', allowed: ALL },
  { file: 'studies/[id]/members/route.ts', method: 'POST', url: '/api/studies/999999/members', allowed: ['admin', 'lead'] },
  {
    file: 'studies/[id]/members/[userId]/route.ts',
    method: 'DELETE',
    url: '/api/studies/999999/members/999999',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/members/candidates/route.ts',
    method: 'GET',
    url: '/api/studies/999999/members/candidates?q=ab',
    allowed: ['admin', 'lead'],
  },
  { file: 'studies/[id]/runs/route.ts', method: 'GET', url: '/api/studies/1/runs', allowed: ALL },
  { file: 'studies/[id]/runs/route.ts', method: 'POST', url: '/api/studies/999999/runs', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/route.ts', method: 'GET', url: '/api/runs/999999', allowed: ALL },
  { file: 'runs/[id]/route.ts', method: 'PATCH', url: '/api/runs/999999', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/route.ts', method: 'DELETE', url: '/api/runs/999999', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/mask/route.ts', method: 'PUT', url: '/api/runs/999999/mask', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/structural/route.ts', method: 'PUT', url: '/api/runs/999999/structural', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/motion/route.ts', method: 'PUT', url: '/api/runs/999999/motion', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/queue/route.ts', method: 'POST', url: '/api/runs/999999/queue', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/retry/route.ts', method: 'POST', url: '/api/runs/999999/retry', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/cancel/route.ts', method: 'POST', url: '/api/runs/999999/cancel', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/progress/route.ts', method: 'GET', url: '/api/runs/999999/progress', allowed: ALL },
  // assignments and overdue work (runs.manage: leads of the study and admins; rows of study/run 999999 do not exist)
  { file: 'studies/[id]/assignments/route.ts', method: 'GET', url: '/api/studies/999999/assignments', allowed: ['admin', 'lead'] },
  { file: 'studies/[id]/assignments/route.ts', method: 'PATCH', url: '/api/studies/999999/assignments', allowed: ['admin', 'lead'] },
  { file: 'studies/[id]/overdue/route.ts', method: 'GET', url: '/api/studies/999999/overdue', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/assignments/route.ts', method: 'POST', url: '/api/runs/999999/assignments', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/assignments/route.ts', method: 'PATCH', url: '/api/runs/999999/assignments', allowed: ['admin', 'lead'] },
  {
    file: 'runs/[id]/assignments/[raterId]/route.ts',
    method: 'PATCH',
    url: '/api/runs/999999/assignments/999999',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'runs/[id]/assignments/[raterId]/route.ts',
    method: 'DELETE',
    url: '/api/runs/999999/assignments/999999',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'runs/[id]/assignments/[raterId]/reopen/route.ts',
    method: 'POST',
    url: '/api/runs/999999/assignments/999999/reopen',
    allowed: ['admin', 'lead'],
  },
  // rating desk (votes.write: raters, and the admin, who holds every action; rows scoped to the caller's assignments)
  { file: 'runs/[id]/components/route.ts', method: 'GET', url: '/api/runs/999999/components', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/votes/route.ts', method: 'GET', url: '/api/runs/999999/votes', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/votes/[componentId]/route.ts', method: 'PUT', url: '/api/runs/999999/votes/1', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/submit/route.ts', method: 'POST', url: '/api/runs/999999/submit', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/suggestions/route.ts', method: 'GET', url: '/api/runs/999999/suggestions', allowed: ['admin', 'rater'] },
  // learned suggestions: settings and report (readers of agreement), training and switching on (leads)
  {
    file: 'studies/[id]/suggestions/route.ts',
    method: 'GET',
    url: '/api/studies/999999/suggestions',
    allowed: ['admin', 'lead', 'observer'],
  },
  { file: 'studies/[id]/suggestions/route.ts', method: 'PATCH', url: '/api/studies/999999/suggestions', allowed: ['admin', 'lead'] },
  {
    file: 'studies/[id]/suggestions/train/route.ts',
    method: 'POST',
    url: '/api/studies/999999/suggestions/train',
    allowed: ['admin', 'lead'],
  },
  {
    file: 'studies/[id]/suggestions/model/route.ts',
    method: 'GET',
    url: '/api/studies/999999/suggestions/model',
    allowed: ['admin', 'lead', 'observer'],
  },
  { file: 'runs/[id]/desk/route.ts', method: 'PUT', url: '/api/runs/999999/desk', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/files/[file]/route.ts', method: 'GET', url: '/api/runs/999999/files/components.nii.gz', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/view/files/[file]/route.ts', method: 'GET', url: '/api/runs/999999/view/files/components.nii.gz', allowed: ALL },
  { file: 'runs/[id]/maps/[part]/route.ts', method: 'GET', url: '/api/runs/999999/maps/layout', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/series/route.ts', method: 'GET', url: '/api/runs/999999/series', allowed: ['admin', 'rater'] },
  { file: 'runs/[id]/view/maps/[part]/route.ts', method: 'GET', url: '/api/runs/999999/view/maps/1-8', allowed: ALL },
  // releases and exports (addresses of rows that do not exist: allowed roles get 404, never a write)
  { file: 'studies/[id]/releases/route.ts', method: 'GET', url: '/api/studies/999999/releases', allowed: ['admin', 'lead', 'observer'] },
  { file: 'studies/[id]/releases/route.ts', method: 'POST', url: '/api/studies/999999/releases', allowed: ['admin', 'lead'] },
  {
    file: 'studies/[id]/releases/jobs/[jobId]/route.ts',
    method: 'GET',
    url: '/api/studies/999999/releases/jobs/1',
    allowed: ['admin', 'lead', 'observer'],
  },
  { file: 'releases/[releaseId]/route.ts', method: 'GET', url: '/api/releases/999999', allowed: ['admin', 'lead', 'observer'] },
  {
    file: 'releases/[releaseId]/archive/route.ts',
    method: 'GET',
    url: '/api/releases/999999/archive',
    allowed: ['admin', 'lead', 'observer'],
  },
  {
    file: 'releases/[releaseId]/files/[name]/route.ts',
    method: 'GET',
    url: '/api/releases/999999/files/manifest.json',
    allowed: ['admin', 'lead', 'observer'],
  },
  { file: 'runs/[id]/denoise/route.ts', method: 'GET', url: '/api/runs/999999/denoise', allowed: ['admin', 'lead', 'observer'] },
  { file: 'runs/[id]/denoise/route.ts', method: 'POST', url: '/api/runs/999999/denoise', allowed: ['admin', 'lead'] },
  { file: 'runs/[id]/denoise/[jobId]/route.ts', method: 'GET', url: '/api/runs/999999/denoise/1', allowed: ['admin', 'lead', 'observer'] },
  { file: 'account/tokens/route.ts', method: 'GET', url: '/api/account/tokens', allowed: ['admin', 'lead', 'observer'] },
  { file: 'account/tokens/route.ts', method: 'POST', url: '/api/account/tokens', allowed: ['admin', 'lead', 'observer'] },
  {
    file: 'account/tokens/[tokenId]/route.ts',
    method: 'DELETE',
    url: '/api/account/tokens/999999',
    allowed: ['admin', 'lead', 'observer'],
  },
  // the pipeline API authenticates Bearer tokens, not sessions (a session alone gets 401; writes 405):
  // tested in tests/integration/tokens-api.test.ts
  ...(['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const).flatMap((method) => [
    {
      file: 'v1/studies/[id]/releases/latest/runs/route.ts',
      method,
      url: '/api/v1/studies/1/releases/latest/runs',
      allowed: 'skip' as const,
    },
    {
      file: 'v1/releases/[releaseId]/files/[name]/route.ts',
      method,
      url: '/api/v1/releases/1/files/manifest.json',
      allowed: 'skip' as const,
    },
  ]),
  // next-auth's own endpoints and the JSON 404 for unknown addresses are not permission-checked routes.
  { file: 'auth/[...nextauth]/route.ts', method: 'GET', url: '/api/auth/session', allowed: 'skip' },
  { file: 'auth/[...nextauth]/route.ts', method: 'POST', url: '/api/auth/signout', allowed: 'skip' },
  ...(['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const).map((method) => ({
    file: '[...unknown]/route.ts',
    method,
    url: '/api/no-such-route',
    allowed: 'skip' as const,
  })),
];
