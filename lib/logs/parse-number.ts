/**
 * Decimal numbers parsed straight from bytes, without making a string per cell.
 * Values with at most 15 significant digits and a decimal exponent within ±22 are exact products
 * or quotients of two exactly representable doubles, hence correctly rounded (Clinger's fast
 * path); anything else falls back to the engine's own parser.
 */

/** Exact powers of ten, 10⁰ … 10²². */
export const POW10: readonly number[] = Array.from({ length: 23 }, (_, i) => 10 ** i);
const SPACE = 0x20;
const TAB = 0x09;
const QUOTE = 0x22;

/** Marker for an empty cell (only spaces, or nothing), distinct from a malformed one (NaN). */
export const EMPTY_CELL = Number.NEGATIVE_INFINITY;

/**
 * The number in bytes[start, end), EMPTY_CELL for an empty cell, NaN when it is not a finite
 * decimal number. Surrounding spaces and one pair of double quotes are allowed.
 */
export function parseDecimal(bytes: Uint8Array, start: number, end: number): number {
  let s = start;
  let e = end;
  while (s < e && (bytes[s] === SPACE || bytes[s] === TAB)) s++;
  while (e > s && (bytes[e - 1] === SPACE || bytes[e - 1] === TAB)) e--;
  if (e - s >= 2 && bytes[s] === QUOTE && bytes[e - 1] === QUOTE) {
    s++;
    e--;
  }
  if (s === e) return EMPTY_CELL;
  let i = s;
  let negative = false;
  const first = bytes[i];
  if (first === 0x2d /* - */) {
    negative = true;
    i++;
  } else if (first === 0x2b /* + */) {
    i++;
  }
  let mantissa = 0;
  let digits = 0;
  let significant = 0;
  let scale = 0;
  // Digits before and after one decimal point; each digit after it lowers the scale.
  let point = false;
  while (i < e) {
    const c = bytes[i] ?? 0;
    if (c === 0x2e /* . */ && !point) {
      point = true;
      i++;
      continue;
    }
    const d = c - 0x30;
    if (d < 0 || d > 9) break;
    if (significant > 0 || d !== 0) significant++;
    mantissa = mantissa * 10 + d;
    digits++;
    if (point) scale--;
    i++;
  }
  if (digits === 0) return Number.NaN;
  if (i < e && (bytes[i] === 0x65 || bytes[i] === 0x45) /* e E */) {
    i++;
    let expNegative = false;
    if (bytes[i] === 0x2d) {
      expNegative = true;
      i++;
    } else if (bytes[i] === 0x2b) {
      i++;
    }
    let exponent = 0;
    let expDigits = 0;
    while (i < e) {
      const d = (bytes[i] ?? 0) - 0x30;
      if (d < 0 || d > 9) break;
      exponent = exponent * 10 + d;
      expDigits++;
      i++;
    }
    if (expDigits === 0) return Number.NaN;
    scale += expNegative ? -exponent : exponent;
  }
  if (i !== e) return Number.NaN;
  if (significant > 15 || scale < -22 || scale > 22) {
    return slowParse(bytes, s, e);
  }
  const magnitude = scale < 0 ? mantissa / (POW10[-scale] ?? 1) : mantissa * (POW10[scale] ?? 1);
  return negative ? -magnitude : magnitude;
}

function slowParse(bytes: Uint8Array, s: number, e: number): number {
  let text = "";
  for (let i = s; i < e; i++) text += String.fromCharCode(bytes[i] ?? 0);
  const v = Number(text);
  return Number.isFinite(v) ? v : Number.NaN;
}
