import { handler } from '@/lib/api/handler';
import { studyIdParams } from '@/lib/studies/schema';
import { runUploadQuerySchema } from '@/lib/runs/schema';
import { contentLengthOf, uploadRun } from '@/lib/runs/upload';
import { studyWithAccess } from '@/lib/studies/study-with-access';
import { studyProgress } from '@/lib/db/queries/runs';
import { listRunsForStudy } from '@/lib/runs/list-study-runs';
import { notFound } from '@/lib/errors';

// GET /api/studies/:id/runs – the runs table (raters: only their assigned runs) and the study's progress
export const GET = handler({ permission: 'runs.read', params: studyIdParams }, async ({ user, params }) => {
  const access = await studyWithAccess({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  const [runs, progress] = await Promise.all([
    listRunsForStudy({ user, studyId: params.id }),
    studyProgress({ user, studyId: params.id, seesAllRuns: access.seesAllRuns }),
  ]);
  return { runs, progress };
});

// POST /api/studies/:id/runs?name=…&sub=…[&ses,task,acq,run][&queue=true] – upload one run: the raw
// NIfTI bytes are the body (streamed to storage, never held in memory)
export const POST = handler(
  { permission: 'runs.upload', params: studyIdParams, query: runUploadQuerySchema, what: 'The upload' },
  async ({ req, user, params, query }) => {
    const run = await uploadRun({
      user,
      studyId: params.id,
      query,
      raw: { body: req.body, contentLength: contentLengthOf(req), signal: req.signal },
    });
    return Response.json({ run }, { status: 201 });
  },
);
