import { NO_DATA_COLOR, ratioColor, textOn } from './ratio-colors';

describe('ratioColor', () => {
  it('runs from the dark end at 70 % to the light end at 110 %, clamped outside', () => {
    expect(ratioColor(70)).toBe('rgb(0, 34, 78)');
    expect(ratioColor(110)).toBe('rgb(254, 232, 56)');
    expect(ratioColor(40)).toBe(ratioColor(70));
    expect(ratioColor(150)).toBe(ratioColor(110));
  });

  it('gets lighter as the ratio rises, so order reads without hue', () => {
    const luminance = (rgb: string) => {
      const [r, g, b] = (rgb.match(/\d+/g) ?? []).map(Number) as [number, number, number];
      return 0.2126 * r + 0.7152 * g + 0.0722 * b;
    };
    const steps = [70, 80, 90, 100, 110].map((p) => luminance(ratioColor(p)));
    for (let i = 1; i < steps.length; i++) expect(steps[i]).toBeGreaterThan(steps[i - 1] ?? 0);
  });

  it('is grey without data, with dark text on it', () => {
    expect(ratioColor(null)).toBe(NO_DATA_COLOR);
    expect(textOn(null)).toBe('#1b1b1b');
    expect(textOn(75)).toBe('#ffffff');
  });
});
