import { describe, expect, it } from "vitest";
import { EMPTY_CELL, POW10, parseDecimal } from "@/lib/logs/parse-number";

// Reference: the engine's own Number() (ECMAScript StringNumericLiteral, correctly rounded), which
// parseDecimal must agree with bit for bit (toBe, no tolerance) on every decimal it accepts.
const enc = new TextEncoder();
const parse = (s: string) => parseDecimal(enc.encode(s), 0, s.length);

describe("number parsing from bytes", () => {
  it("agrees with Number() on ordinary and awkward decimals", () => {
    for (const s of [
      "0",
      "-0.5",
      "+12.25",
      "1e3",
      "-2.5E-4",
      "123456789012345",
      "0.1",
      "3.14159265358979",
      ".5",
      "5.",
      "-.25",
      "1234567890123456789",
      "1e-30",
      "1.7976931348623157e308",
      "0.000000000000000000001",
    ]) {
      expect(parse(s)).toBe(Number(s));
    }
    expect(parse(' "7.5" ')).toBe(7.5);
    expect(parse("\t-3\t")).toBe(-3);
  });

  it("agrees with Number() on 2,000 seeded random decimals of 1 to 17 digits", () => {
    let seed = 12345;
    const next = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (let n = 0; n < 2000; n++) {
      const digits = 1 + Math.floor(next() * 17);
      let m = "";
      for (let k = 0; k < digits; k++) m += Math.floor(next() * 10);
      const point = Math.floor(next() * (digits + 1));
      const text = `${next() < 0.5 ? "-" : ""}${m.slice(0, point)}.${m.slice(point)}`;
      expect(parse(text)).toBe(Number(text));
    }
  });

  it("reads a cell inside a longer buffer by its bounds only", () => {
    const bytes = enc.encode("12,-3.5,7");
    expect(parseDecimal(bytes, 3, 7)).toBe(-3.5);
    expect(parseDecimal(bytes, 8, 9)).toBe(7);
  });

  it("rejects what is not a finite decimal number, and tells an empty cell apart", () => {
    for (const s of [
      "abc",
      "1.2.3",
      "--1",
      "1e",
      "NaN",
      "inf",
      "0x10",
      "1,5",
      ".",
      "-",
      "1e400",
      "e5",
    ])
      expect(parse(s)).toBeNaN();
    expect(parse("   ")).toBe(EMPTY_CELL);
    expect(parse("")).toBe(EMPTY_CELL);
    expect(parse('""')).toBe(EMPTY_CELL);
  });

  it("keeps exact powers of ten up to 1e22 (the largest power of ten a double holds exactly)", () => {
    // 10^22 < 2^53 · 2^22 and 5^22 < 2^53, so 10^22 = 5^22 · 2^22 is exact; 10^23 is not.
    expect(POW10).toHaveLength(23);
    expect(POW10[22]).toBe(1e22);
    expect(BigInt(POW10[22] ?? 0)).toBe(10n ** 22n);
  });
});
