/**
 * Line styles for charts with several series: each differs by dash as well as by colour, so the
 * lines are told apart without colour (and in a grey print-out). Each colour reads at 4.5:1 or more
 * on white, as the legend writes the series names in it (WCAG 2.1, 1.4.3).
 */
export const LINE_STYLES = [
  { stroke: "#14313d", dash: "" },
  { stroke: "#96600f", dash: "6 3" },
  { stroke: "#1d7a4a", dash: "2 3" },
  { stroke: "#8f1d1d", dash: "10 3 2 3" },
  { stroke: "#5b4a8a", dash: "4 4" },
  { stroke: "#56666e", dash: "1 2" },
] as const;

export function lineStyle(i: number): { stroke: string; dash: string } {
  return LINE_STYLES[i % LINE_STYLES.length] ?? LINE_STYLES[0];
}
