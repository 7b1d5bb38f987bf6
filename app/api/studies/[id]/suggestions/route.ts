import { handler } from '@/lib/api/handler';
import { changeSuggestionSettings } from '@/lib/suggestions/change-suggestion-settings';
import { suggestionSettingsSchema, suggestionStudyParamsSchema } from '@/lib/suggestions/schema';
import { studySuggestions } from '@/lib/suggestions/study-suggestions';

// GET /api/studies/:id/suggestions – whether raters see suggestions, the model in use with its cross-validated report, the last training job
export const GET = handler(
  { permission: 'agreement.read', params: suggestionStudyParamsSchema, what: 'The study' },
  async ({ user, params }) => studySuggestions({ user, studyId: params.id }),
);

// PATCH /api/studies/:id/suggestions – { enabled }: a lead shows suggestions to raters (after their own vote) or hides them
export const PATCH = handler(
  { permission: 'studies.update', params: suggestionStudyParamsSchema, body: suggestionSettingsSchema, what: 'The study' },
  async ({ user, params, body }) => changeSuggestionSettings({ user, studyId: params.id, enabled: body.enabled }),
);
