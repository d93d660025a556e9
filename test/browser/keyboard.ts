import type { Page } from "playwright-core";

/** Where one Tab press put the focus, and whether a ring was drawn around it. */
export interface TabStop {
  /** The index given by `markActions`, or -1 for an element that is not one of them. */
  index: number;
  label: string;
  focusVisible: boolean;
  outline: string;
}

// What a keyboard user can act on (HTML's focusable elements, less the hidden and the disabled).
const ACTIONS =
  "a[href], button:not([disabled]), input:not([type=hidden]):not([disabled]), select:not([disabled]), textarea:not([disabled]), summary, [tabindex]:not([tabindex='-1'])";

/**
 * Numbers every action inside `scope` in document order (which is the tab order: the app sets no
 * positive tabindex), skipping those a person cannot see: hidden, or inside a closed <details>.
 * Returns their labels.
 */
export async function markActions(page: Page, scope = "body"): Promise<string[]> {
  return page.evaluate(
    ({ scope, selector }) => {
      const root = document.querySelector(scope);
      if (!root) throw new Error(`no ${scope} on the page`);
      const shown = (el: Element) => {
        const closed = el.closest("details:not([open])");
        const insideClosed = closed !== null && el.parentElement !== closed;
        return !insideClosed && el.checkVisibility({ visibilityProperty: true });
      };
      const list = Array.from(root.querySelectorAll(selector)).filter(shown);
      list.forEach((el, i) => el.setAttribute("data-tab-index", String(i)));
      return list.map((el) =>
        (el.getAttribute("aria-label") ?? el.textContent ?? el.tagName).trim().slice(0, 40),
      );
    },
    { scope, selector: ACTIONS },
  );
}

/**
 * Presses Tab until the action numbered `last` has the focus (at most `maxPresses` times) and
 * reports each element focused, once: a date field takes several presses, one per part.
 */
export async function tabThrough(page: Page, last: number, maxPresses: number): Promise<TabStop[]> {
  const stops: TabStop[] = [];
  for (let i = 0; i < maxPresses && stops.at(-1)?.index !== last; i++) {
    await page.keyboard.press("Tab");
    stops.push(
      await page.evaluate(() => {
        const el = document.activeElement;
        if (!el || el === document.body)
          return { index: -1, label: "(body)", focusVisible: false, outline: "" };
        const style = getComputedStyle(el);
        return {
          index: Number(el.getAttribute("data-tab-index") ?? "-1"),
          label: (el.getAttribute("aria-label") ?? el.textContent ?? el.tagName)
            .trim()
            .slice(0, 40),
          focusVisible: el.matches(":focus-visible"),
          outline: `${style.outlineStyle} ${style.outlineWidth}`,
        };
      }),
    );
    const [previous, current] = stops.slice(-2);
    if (previous && current && previous.index === current.index && current.index >= 0) stops.pop();
  }
  return stops;
}

/** True when the ring is drawn: a solid outline at least 2 px wide. */
export function ringShown(stop: TabStop): boolean {
  const [style, width] = stop.outline.split(" ");
  return stop.focusVisible && style !== "none" && Number.parseFloat(width ?? "0") >= 2;
}

/**
 * Every visible action on the page that draws no focus ring when it has keyboard focus. One Tab
 * press puts the page in keyboard mode; moving the focus from script then keeps `:focus-visible`
 * (the HTML focus heuristics), so each element is checked without tabbing the whole page.
 */
export async function unringedActions(page: Page): Promise<string[]> {
  await markActions(page);
  await page.keyboard.press("Tab");
  return page.evaluate(() => {
    const missing: string[] = [];
    for (const el of Array.from(document.querySelectorAll<HTMLElement>("[data-tab-index]"))) {
      el.focus({ preventScroll: true });
      if (document.activeElement !== el) continue;
      const style = getComputedStyle(el);
      const ringed =
        el.matches(":focus-visible") &&
        style.outlineStyle !== "none" &&
        Number.parseFloat(style.outlineWidth) >= 2;
      if (!ringed)
        missing.push(
          `${el.tagName.toLowerCase()} "${(el.getAttribute("aria-label") ?? el.textContent ?? "").trim().slice(0, 40)}"`,
        );
    }
    if (document.activeElement instanceof HTMLElement) document.activeElement.blur();
    return missing;
  });
}
