/** The caller's address for the audit log (first X-Forwarded-For hop, else X-Real-IP). */
export function clientIp(req: Request): string | null {
  const forwarded = req.headers.get('x-forwarded-for');
  if (forwarded) return forwarded.split(',')[0].trim().slice(0, 64) || null;
  return req.headers.get('x-real-ip')?.slice(0, 64) ?? null;
}
