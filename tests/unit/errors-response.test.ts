/**
 * errorResponse (lib/api/error-response.ts): what a thrown value becomes. A client that closes the connection
 * while its body is read makes Node's request stream fail with Error('aborted'), code ECONNRESET
 * (Node.js documentation, http.IncomingMessage 'aborted' / ECONNRESET "Connection reset by peer");
 * that is not a server fault: one warning line, no stack, and a 400 nobody will read. The same code
 * from the database driver (a fatal connection error) still means the database is unavailable.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { AppError } from '@/lib/errors';
import { errorResponse } from '@/lib/api/error-response';

afterEach(() => vi.restoreAllMocks());

function aborted(): Error {
  return Object.assign(new Error('aborted'), { code: 'ECONNRESET' });
}

describe('errorResponse', () => {
  it('a client that went away mid-body: 400, one warning line, not an unexpected error', async () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {});
    const error = vi.spyOn(console, 'error').mockImplementation(() => {});
    const res = errorResponse(aborted(), 'PUT /api/runs/5/votes/59');
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/cut off before it arrived in full/);
    expect(error).not.toHaveBeenCalled();
    expect(warn).toHaveBeenCalledTimes(1);
    expect(String(warn.mock.calls[0][0])).toMatch(/^\[PUT \/api\/runs\/5\/votes\/59\] the client closed the connection/);
  });

  it("the database driver's fatal ECONNRESET is still 'database unavailable' (503)", async () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    const res = errorResponse(Object.assign(new Error('read ECONNRESET'), { code: 'ECONNRESET', fatal: true }), 'GET /x');
    expect(res.status).toBe(503);
  });

  it('anything else unknown: 500 with the generic text, logged in full', async () => {
    const error = vi.spyOn(console, 'error').mockImplementation(() => {});
    const res = errorResponse(new TypeError('boom at lib/x.ts:1'), 'GET /x');
    expect(res.status).toBe(500);
    const text = await res.text();
    expect(text).not.toMatch(/boom|lib\/x/);
    expect(error).toHaveBeenCalledTimes(1);
  });

  it('an AppError keeps its own status and message', async () => {
    const res = errorResponse(new AppError('conflict', 'Run 3 has been released.'), 'PUT /x');
    expect(res.status).toBe(409);
  });
});
