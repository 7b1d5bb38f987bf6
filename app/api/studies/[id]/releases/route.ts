import { z } from 'zod';
import { auditAddress } from '@/lib/auth/client-address';
import { handler } from '@/lib/api/handler';
import { listReleases, releaseReadiness } from '@/lib/db/queries/releases';
import { publicManifest, refusalOf, requestRelease } from '@/lib/releases/create-release';
import { createReleaseSchema } from './schema';

const params = z.object({ id: z.coerce.number().int().positive() });

// GET /api/studies/:id/releases – the study's releases (newest first) and whether it can be released now
export const GET = handler(
  { permission: 'releases.read', params, what: 'The releases request', scope: 'study' },
  async ({ access, params }) => {
    const readiness = await releaseReadiness({ studyId: params.id });
    const releases = await listReleases({ studyId: params.id });
    return {
      study: { id: access.studyId, name: access.name },
      readiness: { ...readiness, refusal: refusalOf(readiness, params.id) },
      releases: releases.map((r) => ({ ...r, manifest: r.manifest ? publicManifest(r.manifest) : null })),
    };
  },
);

// POST /api/studies/:id/releases – a lead releases the study (or one run with {runId}): 202 with the
// release job's id (the worker builds it; GET …/releases/jobs/:jobId follows it), the open job of the
// same scope when there is one; 409 with the reason when decisions are incomplete
export const POST = handler(
  { permission: 'releases.create', params, body: createReleaseSchema, what: 'The release' },
  async ({ user, params, body, req }) => {
    const { jobId, existing } = await requestRelease({
      user,
      studyId: params.id,
      runId: body.runId ?? null,
      notes: body.notes || null,
      ip: auditAddress(req),
    });
    return Response.json({ jobId, existing }, { status: 202 });
  },
);
