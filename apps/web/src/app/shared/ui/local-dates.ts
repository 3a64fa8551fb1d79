/** The date (YYYY-MM-DD) on this device's calendar, `daysAgo` days back; a starting value for date pickers. */
export function localDay(daysAgo = 0): string {
  const d = new Date(Date.now() - daysAgo * 86_400_000);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
}
