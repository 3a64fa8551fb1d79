/**
 * The map's colour scale: cividis (Nuñez, Anderton & Renslow 2018), a perceptually even scale designed to be
 * read the same with and without colour-vision deficiency. Dark blue at 70 % of expected, yellow at 110 %.
 */
export const RATIO_SCALE = ['#00224e', '#35456c', '#666970', '#948e77', '#c8b866', '#fee838'];
export const RATIO_MIN = 70;
export const RATIO_MAX = 110;
export const NO_DATA_COLOR = '#d4d4d4';

function hexToRgb(hex: string): [number, number, number] {
  const n = Number.parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

/** The scale's colour for a ratio in % (clamped to 70–110), or grey without data. */
export function ratioColor(percent: number | null): string {
  if (percent === null) return NO_DATA_COLOR;
  const t =
    (Math.min(RATIO_MAX, Math.max(RATIO_MIN, percent)) - RATIO_MIN) / (RATIO_MAX - RATIO_MIN);
  const position = t * (RATIO_SCALE.length - 1);
  const i = Math.min(RATIO_SCALE.length - 2, Math.floor(position));
  const f = position - i;
  const a = hexToRgb(RATIO_SCALE[i] ?? '#000000');
  const b = hexToRgb(RATIO_SCALE[i + 1] ?? '#000000');
  const mix = a.map((v, k) => Math.round(v + ((b[k] ?? 0) - v) * f));
  return `rgb(${mix[0]}, ${mix[1]}, ${mix[2]})`;
}

/** Dark text on the light end of the scale, light text on the dark end. */
export function textOn(percent: number | null): string {
  return percent === null || percent >= 94 ? '#1b1b1b' : '#ffffff';
}
