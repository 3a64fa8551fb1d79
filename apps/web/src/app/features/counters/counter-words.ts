/** "12 held readings (480 eggs)", "1 held reading (3 eggs)": what an unknown counter brings, in words. */
export function heldWords(readings: number, eggs: number): string {
  const count = readings.toLocaleString('en-GB');
  return `${count} held ${readings === 1 ? 'reading' : 'readings'} (${eggs.toLocaleString('en-GB')} ${eggs === 1 ? 'egg' : 'eggs'})`;
}
