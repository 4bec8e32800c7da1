/** "2025-01-31 14:05" in local time: fixed width, sorts as text, no locale surprises. */
export function formatLocalTime(epochMs: number): string {
  const d = new Date(epochMs);
  const two = (n: number): string => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())} ${two(d.getHours())}:${two(d.getMinutes())}`;
}
