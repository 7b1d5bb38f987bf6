import { handler } from '@/lib/api/handler';
import { requestTraining } from '@/lib/suggestions/request-training';
import { suggestionStudyParamsSchema, trainRequestSchema } from '@/lib/suggestions/schema';

// POST /api/studies/:id/suggestions/train – { sourceStudyIds? }: a lead queues training from released decisions (this study by default)
export const POST = handler(
  { permission: 'studies.update', params: suggestionStudyParamsSchema, body: trainRequestSchema, what: 'The study' },
  async ({ user, params, body }) => {
    const r = await requestTraining({ user, studyId: params.id, sourceStudyIds: body.sourceStudyIds });
    return Response.json(r, { status: 202 });
  },
);
