import { describe, expect, it } from 'vitest';
import { BRAND, contrastRatio, deriveScale, deriveSurface, mix, parseHex, relativeLuminance, SHADES } from '../../src/theme/palette';

describe('palette', () => {
  it('keeps the field teal as shade 600 when the primary scale is derived', () => {
    expect(deriveScale(BRAND.fieldTeal)[600]).toBe('#0f766e');
  });

  it('darkens steadily from 50 to 950 when a scale is derived', () => {
    const scale = deriveScale(BRAND.fieldTeal);
    const luminances = SHADES.map((shade) => relativeLuminance(scale[shade]));
    for (let i = 1; i < luminances.length; i += 1) expect(luminances[i]).toBeLessThan(luminances[i - 1]);
  });

  it('puts chalk at surface 100 and ink at surface 800 when the neutrals are derived', () => {
    const surface = deriveSurface();
    expect(surface[100]).toBe('#f7f5f0');
    expect(surface[800]).toBe('#1f2933');
  });

  it('gives white text on the primary colour at least the 4.5:1 contrast of WCAG 2.1 AA', () => {
    expect(contrastRatio('#ffffff', deriveScale(BRAND.fieldTeal)[600])).toBeGreaterThanOrEqual(4.5);
  });

  it('gives ink text on chalk at least 4.5:1 and muted text (surface 600) on white at least 4.5:1', () => {
    expect(contrastRatio(BRAND.ink, BRAND.chalk)).toBeGreaterThanOrEqual(4.5);
    expect(contrastRatio(deriveSurface()[600], '#ffffff')).toBeGreaterThanOrEqual(4.5);
  });

  it('keeps placeholders (surface 600) and secondary button text (surface 700) at 4.5:1 on every panel shade', () => {
    const surface = deriveSurface();
    for (const background of ['#ffffff', surface[50], surface[100], surface[200]]) {
      expect(contrastRatio(surface[600], background)).toBeGreaterThanOrEqual(4.5);
      expect(contrastRatio(surface[700], background)).toBeGreaterThanOrEqual(4.5);
    }
  });

  it('matches the WCAG 2.1 end points when contrast of black and white is computed', () => {
    expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 10);
    expect(relativeLuminance('#ffffff')).toBeCloseTo(1, 12);
  });

  it('returns the end colours when mixing by 0 and by 1', () => {
    expect(mix('#0F766E', '#ffffff', 0)).toBe('#0f766e');
    expect(mix('#0F766E', '#ffffff', 1)).toBe('#ffffff');
  });

  it('refuses a colour that is not #RRGGBB with a message naming it', () => {
    expect(() => parseHex('teal')).toThrow('"teal" is not a colour of the form #RRGGBB.');
  });
});
