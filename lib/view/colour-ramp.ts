/**
 * The level ramp of the throttle × frequency map, computed rather than copied: lightness rises
 * evenly in OKLab (so the order of levels reads in grey, and for every kind of colour vision), while
 * the hue turns from blue through teal to yellow (the blue–yellow axis that red–green colour-blind
 * eyes keep). Chroma is reduced where a colour would fall outside sRGB.
 *
 * OKLab: B. Ottosson, "A perceptual color space for image processing", 2020 (matrices from that
 * article). sRGB transfer function: IEC 61966-2-1.
 */

export type Rgb = readonly [number, number, number];
export type Lab = readonly [number, number, number];

const cbrt = Math.cbrt;

/** sRGB component (0..1) to linear light. */
export function srgbToLinear(c: number): number {
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}

/** Linear light (0..1) to sRGB component. */
export function linearToSrgb(c: number): number {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
}

/** Linear sRGB to OKLab (L in 0..1). */
export function linearRgbToOklab([r, g, b]: Rgb): Lab {
  const l = cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [
    0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  ];
}

/** OKLab to linear sRGB (may fall outside 0..1 when the colour is out of gamut). */
export function oklabToLinearRgb([L, a, b]: Lab): Rgb {
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.291485548 * b) ** 3;
  return [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.707625901 * s,
  ];
}

const clamp01 = (c: number) => Math.min(1, Math.max(0, c));
const inGamut = (rgb: Rgb) => rgb.every((c) => c >= -1e-9 && c <= 1 + 1e-9);

/** The ramp's end points and shape, in OKLCh. */
const L0 = 0.26;
const L1 = 0.94;
const HUE0_DEG = 262;
const HUE1_DEG = 96;
const PEAK_CHROMA = 0.14;

/** The ramp's colour at t in 0..1 (low to high level), as linear sRGB inside the gamut. */
export function rampLinear(t: number): Rgb {
  const x = Math.min(1, Math.max(0, t));
  const L = L0 + (L1 - L0) * x;
  const hue = ((HUE0_DEG + (HUE1_DEG - HUE0_DEG) * x) * Math.PI) / 180;
  // Less colour at the dark end, most in the middle, a little less at the light end.
  let chroma = PEAK_CHROMA * (0.45 + 0.55 * Math.sin(Math.PI * Math.min(1, 0.15 + 0.85 * x)));
  for (;;) {
    const rgb = oklabToLinearRgb([L, chroma * Math.cos(hue), chroma * Math.sin(hue)]);
    if (inGamut(rgb) || chroma <= 0) return [clamp01(rgb[0]), clamp01(rgb[1]), clamp01(rgb[2])];
    chroma -= 0.002;
  }
}

/** CSS colour of the ramp at t in 0..1. */
export function rampColour(t: number): string {
  const [r, g, b] = rampLinear(t).map((c) => Math.round(linearToSrgb(c) * 255));
  return `rgb(${r},${g},${b})`;
}
