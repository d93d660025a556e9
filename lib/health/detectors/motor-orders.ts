import { foldedHz } from "../../signal/folding";
import { round } from "../../signal/stats";
import type { Finding } from "../findings";
import { motorNamed } from "../motor-positions";
import { ADVICE } from "./advice";
import type { DetectorContext } from "./context";
import { betweenName, isWhole, risenHalfOrders, standsOut } from "./order-evidence";
import { graded } from "./shared";

/** The sentence names at most this many of the tones between a motor's orders. */
const MAX_TONES_NAMED = 3;

function orderName(order: number, bladeCount: number): string {
  if (order === 1) return "its rotation rate";
  if (order === bladeCount) return `its blade-pass rate (${order}× its rotation)`;
  return `${order}× its rotation rate`;
}

/**
 * For an order above the log's Nyquist frequency: where it shows in this log's spectrum, so that
 * nobody looks for it at its own frequency (lib/signal/folding.ts).
 */
function foldedNote(freqHz: number, sampleRateHz: number): string {
  if (freqHz <= sampleRateHz / 2) return "";
  return `, above what a ${Math.round(sampleRateHz)} Hz log can show: it appears folded, near ${Math.round(foldedHz(freqHz, sampleRateHz))} Hz`;
}

/**
 * A motor whose whole orders rose against its own baseline and the other motors: a prop, or, with
 * tones between its orders too, a loose motor. Run after the floor rise: with a floor rise,
 * broadband noise up high lifts every order above the floor corner at random, motor by motor, so
 * those orders are no evidence against one motor; and a motor the floor rise names for its
 * bearing tones is not named again for rattling (unless its 1× rose).
 */
export function motorOrders(ctx: DetectorContext): Finding[] {
  const { thresholds: h, orders, cornerHz, positions } = ctx;
  const bladeCount = ctx.log.settings.bladeCount;
  const floor = ctx.found.filter((f) => f.kind === "floor-rise");
  const standings = orders.standings.filter(
    (x) => floor.length === 0 || x.rotationHz * x.order < cornerHz,
  );
  const out: Finding[] = [];
  for (const motor of new Set(standings.map((s) => s.motor))) {
    const risen = standings
      .filter((s) => s.motor === motor)
      .map((s) => ({ s, magnitude: standsOut(s, h, orders.excessSigmaDb) }))
      .filter((x) => Number.isFinite(x.magnitude))
      .sort((a, b) => b.magnitude - a.magnitude);
    // A bent or chipped prop shakes at its motor's whole orders (the flight controller's notches
    // may take most of the 1× away, leaving 2× and above); a loose motor rattles, which adds
    // half orders (sub-harmonics and sidebands) to the whole ones. Half orders alone, without a
    // whole one, are the bearing's tones: the floor-rise finding names that motor.
    const whole = risen.filter((x) => isWhole(x.s));
    const top = whole[0];
    if (!top) continue;
    const halves = risen.filter((x) => !isWhole(x.s));
    const grade = graded(top.magnitude, h.levelDb, h);
    if (!grade) continue;
    const { s } = top;
    const wholeOrders = [...new Set(whole.map((x) => x.s.order))].sort((a, b) => a - b);
    // Sidebands alone do not make a rattle: a strong or smeared 1× spills beside itself too. With
    // the motor named, an exact half order that rose over its own baseline is enough to tell a
    // rattle from a prop.
    const locked = risenHalfOrders(standings, motor, h);
    const rattle = halves.some((x) => !x.s.side) || locked.length > 0;
    if (rattle && s.order !== 1 && floor.some((x) => x.motor === motor)) continue;
    const at = `${orderName(s.order, bladeCount)} (about ${Math.round(s.rotationHz * s.order)} Hz${s.order === 1 ? "" : `; it turns at ${Math.round(s.rotationHz)} Hz`}${foldedNote(s.rotationHz * s.order, ctx.log.sampleRateHz)})`;
    const tones = [...new Set([...halves.map((x) => x.s), ...locked].map(betweenName))]
      .slice(0, MAX_TONES_NAMED)
      .join(", ");
    const advice = rattle
      ? `with tones between its orders (${tones}) as a loose part rattles: ${ADVICE.motorRattle}`
      : ADVICE.prop;
    out.push({
      axis: s.axis,
      kind: "motor-order",
      freqHz: round(s.rotationHz, 1),
      motor,
      order: s.order,
      orders: wholeOrders,
      cause: rattle ? "motor-mount" : "prop",
      deltaDb: round(s.ownDb, 1),
      ...grade,
      text: `${motorNamed(motor, positions)} vibrates ${s.ownDb.toFixed(0)} dB more at ${at} than in the baseline, and more than the other motors: ${advice}`,
    });
  }
  return out;
}
