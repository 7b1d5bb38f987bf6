import { notFound } from '@/lib/errors';

// Any unknown /api address – a JSON 404 instead of an HTML page
const answer = async () => notFound('That API route').toResponse();
export { answer as GET, answer as POST, answer as PUT, answer as PATCH, answer as DELETE };
