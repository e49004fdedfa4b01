/** Presentation helpers for card text. */

/** "12 min", "3 h 5 min", "2 d 4 h": ages as a prescriber reads them. */
export function formatAge(minutes: number): string {
  if (minutes < 60) return `${Math.max(0, Math.round(minutes))} min`;
  if (minutes < 48 * 60) {
    const h = Math.floor(minutes / 60);
    const m = Math.round(minutes - h * 60);
    return m ? `${h} h ${m} min` : `${h} h`;
  }
  const d = Math.floor(minutes / 1440);
  const h = Math.round((minutes - d * 1440) / 60);
  return h ? `${d} d ${h} h` : `${d} d`;
}
