/**
 * The cautions heatcheck shows wherever it shows a score. One text, used by the CLI, the app and
 * the README, so that they never drift apart.
 */
export const DECISION_AID_NOTE =
  "The score is a decision aid, not an airworthiness certificate. Pull and inspect the quad yourself before it flies again.";

export const SAFETY_CAUTIONS: readonly string[] = [
  "Remove the props and disconnect the battery before any bench work or hand-spinning of motors.",
  "Handle LiPo packs with care: do not fly, charge or store a puffed, dented or crash-damaged pack; charge on a fire-safe surface and never unattended.",
  "A crack can hide under paint or in the arm's core: check every arm by eye and by flexing it gently, and replace what you doubt.",
  "Follow your event's rules and local regulations; a race director's or scrutineer's call overrides any score here.",
];
