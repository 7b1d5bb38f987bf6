import { handler } from '@/lib/api/handler';
import { storageByStudy } from '@/lib/db/queries/storage-use';

// GET /api/admin/storage – bytes per study: uploaded runs plus the files of their decompositions
export const GET = handler({ permission: 'storage.read' }, async () => ({ studies: await storageByStudy() }));
