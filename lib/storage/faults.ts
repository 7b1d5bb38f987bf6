/**
 * Storage faults (disk full, permission denied, read-only file system) as clear answers instead of
 * a generic 500 or raw `EPERM …` text: 507 when the storage is full, 503 when it cannot be
 * written. The file system's own message (it names paths) goes to the log and, for the admin,
 * into the audit log as a `storage.fault` entry that the Facility page shows as an alert.
 */
const FULL = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);
const DENIED = new Set(['EACCES', 'EPERM', 'EROFS']);

export type StorageFaultKind = 'full' | 'denied';

/** The kind of storage fault an error is, or null when it is none. */
export function storageFaultKind(err: unknown): StorageFaultKind | null {
  const code = (err as { code?: unknown } | null)?.code;
  if (typeof code !== 'string') return null;
  if (FULL.has(code)) return 'full';
  if (DENIED.has(code)) return 'denied';
  return null;
}

export const STORAGE_FAULT_MESSAGES: Record<StorageFaultKind, string> = {
  full: "The facility's storage is full, so nothing was saved. Try again later; the facility admin has been alerted.",
  denied:
    "The facility's storage cannot be written right now (read-only or permission denied), so nothing was saved. The facility admin has been alerted.",
};
