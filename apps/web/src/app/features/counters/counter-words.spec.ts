import { heldWords } from './counter-words';

describe('heldWords', () => {
  it('says how many readings and eggs are held, with thousands separators and singulars', () => {
    expect(heldWords(1200, 54321)).toBe('1,200 held readings (54,321 eggs)');
    expect(heldWords(1, 1)).toBe('1 held reading (1 egg)');
    expect(heldWords(2, 0)).toBe('2 held readings (0 eggs)');
  });
});
