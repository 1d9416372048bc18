/**
 * Colour scales for the PrimeVue preset, derived from the product colours of PRODUCT.md ("Look")
 * so that one hex value, not eleven hand-picked ones, defines each scale.
 */

export type Shade = 50 | 100 | 200 | 300 | 400 | 500 | 600 | 700 | 800 | 900 | 950;
export type Scale = Record<Shade, string>;

export const SHADES: readonly Shade[] = [50, 100, 200, 300, 400, 500, 600, 700, 800, 900, 950];

type Rgb = [number, number, number];

export function parseHex(hex: string): Rgb {
  const match = /^#?([0-9a-f]{6})$/i.exec(hex.trim());
  if (!match) throw new Error(`"${hex}" is not a colour of the form #RRGGBB.`);
  const value = parseInt(match[1], 16);
  return [(value >> 16) & 255, (value >> 8) & 255, value & 255];
}

export function formatHex([r, g, b]: Rgb): string {
  const part = (c: number) => Math.round(Math.min(255, Math.max(0, c))).toString(16).padStart(2, '0');
  return `#${part(r)}${part(g)}${part(b)}`;
}

/** Linear blend in sRGB of `from` towards `to` by `amount` in [0, 1] (0 gives `from`). */
export function mix(from: string, to: string, amount: number): string {
  const a = parseHex(from);
  const b = parseHex(to);
  return formatHex([a[0] + (b[0] - a[0]) * amount, a[1] + (b[1] - a[1]) * amount, a[2] + (b[2] - a[2]) * amount]);
}

/**
 * Relative luminance of an sRGB colour, in [0, 1].
 * Source: W3C, Web Content Accessibility Guidelines (WCAG) 2.1, definition of "relative luminance".
 */
export function relativeLuminance(hex: string): number {
  const channel = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  const [r, g, b] = parseHex(hex).map(channel) as Rgb;
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Contrast ratio of two colours, in [1, 21]. Source: WCAG 2.1, definition of "contrast ratio". */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** How far each lighter shade moves towards white, and each darker one towards the dark end. */
const TINT: Partial<Record<Shade, number>> = { 50: 0.94, 100: 0.86, 200: 0.72, 300: 0.54, 400: 0.34, 500: 0.16 };
const SHADE: Partial<Record<Shade, number>> = { 700: 0.18, 800: 0.34, 900: 0.48, 950: 0.66 };

/**
 * A 50–950 scale with `base` as shade 600: tints mix it with `light`, shades with `dark`.
 * Shade 600 is the base so that white text on the primary colour keeps its contrast.
 */
export function deriveScale(base: string, light = '#ffffff', dark = '#000000'): Scale {
  const scale = {} as Scale;
  for (const shade of SHADES) {
    if (shade === 600) scale[shade] = formatHex(parseHex(base));
    else if (shade < 600) scale[shade] = mix(base, light, TINT[shade] ?? 0);
    else scale[shade] = mix(base, dark, SHADE[shade] ?? 0);
  }
  return scale;
}

/** PRODUCT.md colours. Amber and red are for cautions only. */
export const BRAND = {
  fieldTeal: '#0F766E',
  chalk: '#F7F5F0',
  ink: '#1F2933',
  flareAmber: '#D97706',
  slate: '#64748B',
} as const;

/**
 * The neutral scale: chalk at 100 (page background), ink at 800 (text), warm greys between,
 * so cards and borders sit on the chalk page without a cold cast.
 */
export function deriveSurface(chalk: string = BRAND.chalk, ink: string = BRAND.ink): Scale & { 0: string } {
  return {
    0: '#ffffff',
    50: mix(chalk, '#ffffff', 0.5),
    100: formatHex(parseHex(chalk)),
    200: mix(chalk, ink, 0.08),
    300: mix(chalk, ink, 0.17),
    400: mix(chalk, ink, 0.36),
    500: mix(chalk, ink, 0.56),
    600: mix(chalk, ink, 0.7),
    700: mix(chalk, ink, 0.84),
    800: formatHex(parseHex(ink)),
    900: mix(ink, '#000000', 0.3),
    950: mix(ink, '#000000', 0.55),
  };
}
