export {
  resetRequestSchema,
  resetCompleteSchema,
  resetFormSchema,
  type ResetFormInput,
  type ResetRequestInput,
} from '@/lib/invitations/schema';

export const RESET_SENT_MESSAGE =
  'If an active account exists for that address, an e-mail with a link to choose a new password is on its way. The link works for one hour.';
