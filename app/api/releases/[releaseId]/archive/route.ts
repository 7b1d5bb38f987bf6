import { Readable } from 'node:stream';
import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { recordAudit } from '@/lib/db/queries/audit';
import { archiveName, releaseArchive } from '@/lib/releases/archive';
import { AppError } from '@/lib/errors';
import { sizeOf } from '@/lib/storage';

const params = z.object({ releaseId: z.coerce.number().int().positive() });

// GET /api/releases/:releaseId/archive – the release as one ZIP, streamed (manifest.json with every file's sha256 last)
export const GET = handler({ permission: 'exports.download', scope: 'release', params, what: 'The download' }, async ({ user, access }) => {
  const release = access.release!;
  const manifest = release.manifest!;
  const missing: string[] = [];
  for (const f of manifest.files) if ((await sizeOf(f.key).catch(() => null)) == null) missing.push(f.name);
  if (missing.length)
    throw new AppError(
      'conflict',
      `${missing.length} file(s) of release ${release.id} are missing from storage (${missing.slice(0, 3).join(', ')}); ask the facility admin to restore them.`,
    );
  await recordAudit({
    actorId: user.id,
    action: 'release.download',
    targetType: 'release',
    targetId: release.id,
    studyId: release.studyId,
  });
  const zip = releaseArchive(release, manifest);
  return new Response(Readable.toWeb(zip) as ReadableStream, {
    headers: {
      'Content-Type': 'application/zip',
      'Content-Disposition': `attachment; filename="${archiveName(release, manifest)}"`,
      'Cache-Control': 'private, no-store',
    },
  });
});
