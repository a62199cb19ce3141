// Client-side checks that mirror what the API rejects, so people see the problem before sending.
// The server stays the authority: its VALIDATION_FAILED details are shown as well.

export const MIN_PASSWORD_LENGTH = 10;

export function checkEmail(v: string): string | null {
  const s = v.trim();
  if (!s) return 'Enter an e-mail address.';
  if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(s)) return `"${s}" is not an e-mail address.`;
  return null;
}

export function checkNewPassword(pw: string, confirm: string): { password?: string; confirm?: string } {
  const out: { password?: string; confirm?: string } = {};
  if (pw.length < MIN_PASSWORD_LENGTH) out.password = `Use at least ${MIN_PASSWORD_LENGTH} characters.`;
  if (confirm !== pw) out.confirm = 'The two passwords differ.';
  return out;
}

/**
 * Parse a positive number typed by a person; returns undefined for blank, or an error text.
 * `scale` converts the typed unit to SI (e.g. GHz → Hz = 1e9).
 */
export function parsePositive(raw: string, field: string, scale = 1): { value?: number; error?: string } {
  const s = raw.trim().replace(',', '.');
  if (!s) return {};
  const n = Number(s);
  if (!Number.isFinite(n)) return { error: `${field}: "${raw}" is not a number.` };
  if (n <= 0) return { error: `${field} must be greater than zero.` };
  return { value: n * scale };
}
