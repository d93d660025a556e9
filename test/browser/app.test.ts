import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openSqlite } from "@/lib/archive/sqlite-file";
import { demoCsv } from "@/lib/demo/demo-csv";
import { startApp, type AppServer } from "../support/app-server";
import { axeAtWidths, describeFindings, type AxeFinding } from "./axe";
import { markActions, ringShown, tabThrough, unringedActions } from "./keyboard";

// The built app in Debian's chromium, driven by playwright-core, against the seeded demo team.
// Screenshots of each main screen land in test/screenshots/ (git-ignored) for a person to look at.
const SHOTS = "test/screenshots";
const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
];

let app: AppServer;
let browser: Browser;

async function signedIn(
  email: string,
  password: string,
  width = 1440,
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width, height: 900 } });
  const page = await context.newPage();
  await page.goto(`${app.url}/signin`);
  await page.fill("input[name=email]", email);
  await page.fill("input[name=password]", password);
  await page.click("button[type=submit]");
  await page.waitForURL(`${app.url}/`);
  return { context, page };
}

async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true });
}

async function airframeUrl(page: Page, name: string): Promise<string> {
  await page.goto(`${app.url}/fleet`);
  const href = await page
    .locator(`table[data-testid=fleet] a:has-text("${name}")`)
    .first()
    .getAttribute("href");
  return `${app.url}${href ?? ""}`;
}

// The same flight written the way another logger might (ms, rad/s, throttle in percent): an
// upload of it needs a column map.
function foreignLog(seed: number): string {
  const rows = demoCsv(
    { seed, durationS: 12, sampleRateHz: 2000, airframeSeed: 7 },
    { airframe: "HV-08" },
  )
    .trim()
    .split("\n")
    .filter((l) => !l.startsWith("#"))
    .slice(1)
    .map((l) => {
      const [t, r, p, y, thr] = l.split(",").map(Number);
      const rad = (v: number | undefined) => (((v ?? 0) * Math.PI) / 180).toFixed(6);
      return `${((t ?? 0) / 1000).toFixed(3)},${rad(r)},${rad(p)},${rad(y)},${((thr ?? 0) * 100).toFixed(2)}`;
    });
  return ["Time (ms),Gyro X (rad/s),Gyro Y (rad/s),Gyro Z (rad/s),Thr %", ...rows].join("\n");
}

beforeAll(async () => {
  mkdirSync(SHOTS, { recursive: true });
  app = await startApp();
  browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: CHROMIUM_ARGS });
}, 400_000);

afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

describe("signed out", () => {
  it("pages send you to sign in, the API answers 401", async () => {
    const page = await browser.newPage();
    await page.goto(`${app.url}/fleet`);
    expect(page.url()).toContain("/signin");
    await shot(page, "signin");
    const r = await fetch(`${app.url}/api/v1/queue`);
    expect(r.status).toBe(401);
    await page.close();
  });
});

describe("the crew at work (owner)", () => {
  let page: Page;
  let context: BrowserContext;
  beforeAll(async () => {
    ({ context, page } = await signedIn("owner@heatcheck.test", "pitwall-owner-2026"));
  });
  afterAll(async () => context.close());

  it("the queue shows the demo ranking with reasons in words", async () => {
    const rows = page.locator("[data-testid=queue] > li");
    await expect.poll(() => rows.count(), { timeout: 15_000 }).toBe(9);
    const names = await rows.evaluateAll((els) => els.map((e) => e.getAttribute("data-airframe")));
    // The crashed, uninspected quad first; then the three damaged ones; healthy ones last.
    expect(names[0]).toBe("HV-07");
    expect(new Set(names.slice(1, 4))).toEqual(new Set(["HV-03", "HV-05", "HV-06"]));
    const text = await page.locator("[data-testid=queue]").innerText();
    expect(text).toMatch(/pitch mode at \d+ Hz dropped \d+ % since baseline/);
    expect(text).toMatch(/motor 3 \(rear-right\) vibrates \d+ dB more/);
    expect(text).toMatch(/broadband noise from \d+ to \d+ Hz is up \d+ dB/);
    expect(text).toMatch(/crash on .* with no inspection since/);
    expect(await page.locator(".caution").innerText()).toMatch(
      /decision aid, not an airworthiness certificate/,
    );
    await shot(page, "queue");
    await page.setViewportSize({ width: 1024, height: 768 });
    await shot(page, "queue-tablet");
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it("logging a crash on a healthy quad moves it up the queue", async () => {
    const before = await page
      .locator("[data-testid=queue] > li")
      .evaluateAll((els) => els.map((e) => e.getAttribute("data-airframe")));
    expect(before.indexOf("HV-01")).toBeGreaterThan(3);
    await page.goto(await airframeUrl(page, "HV-01"));
    await page.click("[data-testid=crash-form] summary");
    await page.selectOption("[data-testid=crash-form] select[name=severity]", "hard");
    await page.check('[data-testid=crash-form] input[value="arm front-right"]');
    await page.fill("[data-testid=crash-form] textarea[name=note]", "hit the gate frame");
    await page.click("[data-testid=crash-form] button[type=submit]");
    await page.waitForSelector("[data-testid=crash-form] .form-message.ok");
    await page.goto(`${app.url}/`);
    const after = await page
      .locator("[data-testid=queue] > li")
      .evaluateAll((els) => els.map((e) => e.getAttribute("data-airframe")));
    expect(after.indexOf("HV-01")).toBeLessThan(2);
    expect(await page.locator('[data-airframe="HV-01"]').innerText()).toMatch(
      /hard crash .* \(arm front-right\) with no inspection since/,
    );
  });

  it("the airframe screen draws spectra, the throttle map, parts and history", async () => {
    await page.goto(await airframeUrl(page, "HV-03"));
    await page.waitForSelector("[data-testid=spectrum-pitch] svg path.recharts-curve");
    expect(await page.locator("[data-testid=heatmap] rect").count()).toBeGreaterThan(100);
    expect(await page.locator("[data-testid=installed-parts] tbody tr").count()).toBe(16);
    expect(await page.locator("[data-testid=timeline] li").count()).toBeGreaterThan(2);
    expect(await page.locator("body").innerText()).toMatch(/pitch mode at \d+ Hz dropped/);
    await shot(page, "airframe");
  });

  it("the log screen shows one log against its baseline, the fleet, and each motor's orders", async () => {
    await page.goto(await airframeUrl(page, "HV-05"));
    const href = await page.locator("a:has-text('Open the latest log')").getAttribute("href");
    expect(href).toMatch(/^\/logs\//);
    await page.goto(`${app.url}${href ?? ""}`);
    await page.waitForSelector("[data-testid=spectrum-roll] svg path.recharts-curve");
    await page.waitForSelector("[data-testid=motor-orders] svg path.recharts-curve");
    expect(await page.locator("[data-testid=motor-orders] path.recharts-curve").count()).toBe(4);
    // The order spectrum per motor: four motors, whole and half orders with the blade pass.
    expect(await page.locator("[data-testid=order-table] tbody tr").count()).toBe(4);
    expect(await page.locator("[data-testid=order-table] thead").innerText()).toMatch(
      /1x[\s\S]*2x[\s\S]*blade-pass/,
    );
    expect(await page.locator("[data-testid=fleet-view]").innerText()).toMatch(
      /sister airframes|fleet/,
    );
    expect(await page.locator("body").innerText()).toMatch(
      /motor 3 \(rear-right\) vibrates \d+ dB more/,
    );
    await shot(page, "log");
    await page.setViewportSize({ width: 390, height: 844 });
    await shot(page, "log-phone");
    await page.setViewportSize({ width: 1440, height: 900 });
    const missing = await page.goto(`${app.url}/logs/not-a-log-id`);
    expect(missing?.status()).toBe(404);
  });

  it("the fleet screen shows each design's modes side by side", async () => {
    await page.goto(`${app.url}/fleet`);
    const strips = page.locator("[data-testid=mode-strips]");
    await expect.poll(() => strips.count()).toBe(1);
    // The demo's eight airframes share at least one mode per axis.
    expect(await strips.locator("circle, rect[transform]").count()).toBeGreaterThanOrEqual(3 * 7);
    await page.setViewportSize({ width: 1366, height: 900 });
    await shot(page, "fleet-design");
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it("screenshots of the queue, an airframe with trends, the fleet's design view, a log, upload and parts at 390, 1024 and 1366 px", async () => {
    const airframe = await airframeUrl(page, "HV-03");
    await page.goto(airframe);
    const logHref = await page.locator("a:has-text('Open the latest log')").getAttribute("href");
    const screens = {
      queue: `${app.url}/`,
      airframe,
      fleet: `${app.url}/fleet`,
      log: `${app.url}${logHref ?? ""}`,
      upload: `${app.url}/upload`,
      parts: `${app.url}/parts`,
    };
    for (const width of [390, 1024, 1366]) {
      await page.setViewportSize({ width, height: 900 });
      for (const [name, url] of Object.entries(screens)) {
        await page.goto(url);
        if (name === "airframe")
          await page.waitForSelector("[data-testid=trend-modes] svg path.recharts-curve");
        if (name === "log")
          await page.waitForSelector("[data-testid=spectrum-pitch] svg path.recharts-curve");
        // Nothing wider than the screen: every screen reflows down to a phone.
        expect(
          await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth),
        ).toBeLessThanOrEqual(1);
        await shot(page, `${name}-${width}`);
      }
    }
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it("the queue and the airframe screen fit a 390 px phone", async () => {
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${app.url}/`);
    const row = page.locator("[data-testid=queue] > li").first();
    const reasons = row.locator("ul");
    // The reasons get (nearly) the row's whole width, not a squeezed column.
    const [rowBox, reasonsBox] = [await row.boundingBox(), await reasons.boundingBox()];
    expect((reasonsBox?.width ?? 0) / (rowBox?.width ?? 1)).toBeGreaterThan(0.8);
    const overflow = await page.evaluate(
      () => document.documentElement.scrollWidth - window.innerWidth,
    );
    expect(overflow).toBeLessThanOrEqual(1);
    await shot(page, "queue-phone");
    await page.goto(await airframeUrl(page, "HV-03"));
    await shot(page, "airframe-phone");
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it("uploading two logs through the upload screen, both analysed", async () => {
    const dir = join(app.dataDir, "to-upload");
    mkdirSync(dir, { recursive: true });
    const good = join(dir, "hv-04-practice-good.csv");
    const loose = join(dir, "hv-04-practice-loose.csv");
    writeFileSync(
      good,
      demoCsv(
        { seed: 901, durationS: 24, airframeSeed: 3 },
        { airframe: "HV-04", flownAt: new Date(Date.now() - 20 * 60_000).toISOString() },
      ),
    );
    writeFileSync(
      loose,
      demoCsv(
        { seed: 902, durationS: 24, airframeSeed: 3, scenario: "loose-stack", severity: 3 },
        { airframe: "HV-04", flownAt: new Date(Date.now() - 10 * 60_000).toISOString() },
      ),
    );
    await page.goto(`${app.url}/upload`);
    await page.setInputFiles("[data-testid=file-input]", [good, loose]);
    await expect.poll(() => page.locator("[data-testid=upload-list] tbody tr").count()).toBe(2);
    expect(await page.locator("[data-testid=upload-list]").innerText()).toMatch(
      /matched by metadata/,
    );
    await page.click("[data-testid=import-all]");
    await expect
      .poll(async () => page.locator('[data-testid=upload-list] tr[data-phase="done"]').count(), {
        timeout: 60_000,
      })
      .toBe(2);
    const results = await page.locator("[data-testid=upload-result]").allInnerTexts();
    expect(results.join(" ")).toMatch(/score \d+/);
    await shot(page, "upload");
  });

  it("a log with foreign headers gets a proposed column map, saved as an import profile", async () => {
    const file = join(app.dataDir, "HV-08 other logger.csv");
    writeFileSync(file, foreignLog(904));
    await page.goto(`${app.url}/upload`);
    await page.setInputFiles("[data-testid=file-input]", [file]);
    await page.waitForSelector("[data-testid=map-step]");
    const map = await page
      .locator('[data-testid=map-step] label:has-text("Map text") input')
      .first()
      .inputValue();
    expect(map).toContain("time=Time (ms)|ms");
    expect(map).toContain("roll=Gyro X (rad/s)|rad/s");
    expect(await page.locator("[data-testid=upload-list]").innerText()).toMatch(
      /matched by file name/,
    );
    await page.fill('[data-testid=map-step] input[placeholder="logger model"]', "other logger");
    await page.click('[data-testid=map-step] button:has-text("Save profile")');
    await expect
      .poll(() => page.locator("[data-testid=profile-note]").innerText())
      .toMatch(/Import profile "other logger" saved/);
    await page.click("[data-testid=import-all]");
    await expect
      .poll(async () => page.locator('[data-testid=upload-list] tr[data-phase="done"]').count(), {
        timeout: 60_000,
      })
      .toBe(1);
    await page.goto(`${app.url}/team`);
    expect(await page.locator("main").innerText()).toMatch(/other logger/);
  });

  it("a foreign log's column map is finished in the table, with no syntax typed", async () => {
    // Headers of an invented logger: time with a unit but no time word, rad/s rates, one of them
    // named so that no guess can tell its axis, throttle as a pulse width, motor speed in Hz.
    const lines = demoCsv(
      { seed: 905, durationS: 12, sampleRateHz: 2000, airframeSeed: 7 },
      { airframe: "HV-08" },
    )
      .trim()
      .split("\n");
    const rows = lines
      .filter((l) => !l.startsWith("#"))
      .slice(1)
      .map((l) => {
        const [t, r, p, y, thr, ...rpm] = l.split(",").map(Number);
        const rad = (v: number | undefined) => (((v ?? 0) * Math.PI) / 180).toFixed(6);
        return [
          t ?? 0,
          rad(r),
          rad(p),
          rad(y),
          (1000 + (thr ?? 0) * 1000).toFixed(0),
          ...rpm.map((v) => (v / 60).toFixed(2)),
        ].join(",");
      });
    const file = join(app.dataDir, "HV-08 bench logger.csv");
    writeFileSync(
      file,
      [
        "clock us,rate X rad,rate Y rad,turn rate rad,thr pwm,esc1 Hz,esc2 Hz,esc3 Hz,esc4 Hz",
        ...rows,
      ].join("\n"),
    );
    await page.goto(`${app.url}/upload`);
    await page.setInputFiles("[data-testid=file-input]", [file]);
    await page.waitForSelector("[data-testid=map-table]");
    expect(await page.locator("[data-testid=map-check]").innerText()).toMatch(
      /Still to do: the map needs a column for yaw/,
    );
    expect(await page.locator("[data-testid=import-all]").isDisabled()).toBe(true);
    // The guesses are already in the table: time from its unit and rising values, rpm from esc + Hz.
    expect(await page.locator('select[aria-label="column for time"]').inputValue()).toBe(
      "clock us",
    );
    expect(await page.locator('select[aria-label="column for motor 3 speed"]').inputValue()).toBe(
      "esc3 Hz",
    );
    await page.selectOption('select[aria-label="column for gyro yaw"]', "turn rate rad");
    await page.selectOption('select[aria-label="unit of gyro yaw"]', "rad/s");
    await expect
      .poll(() => page.locator("[data-testid=map-check]").innerText())
      .toMatch(/Every needed field has a column/);
    // The preview shows the first rows as heatcheck reads them: time from 0 s, rpm from Hz.
    expect(await page.locator("[data-testid=map-table]").innerText()).toMatch(
      /0, 0\.0005, 0\.001 s from the first row/,
    );
    await shot(page, "upload-map-table");
    await page.setViewportSize({ width: 390, height: 844 });
    await shot(page, "upload-map-table-phone");
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.click("[data-testid=import-all]");
    await expect
      .poll(async () => page.locator('[data-testid=upload-list] tr[data-phase="done"]').count(), {
        timeout: 60_000,
      })
      .toBe(1);
  });

  it("setting a baseline from the uploaded good log scores the later one against it", async () => {
    await page.goto(await airframeUrl(page, "HV-04"));
    await page.click("[data-testid=baseline-form] summary");
    await page.check('[data-testid=baseline-form] label:has-text("hv-04-practice-good.csv") input');
    await page.fill(
      "[data-testid=baseline-form] input[name=reason]",
      "clean practice pack after re-torquing",
    );
    await page.click("[data-testid=baseline-form] button[type=submit]");
    await expect
      .poll(() => page.locator("[data-testid=baseline-form] .form-message.ok").innerText())
      .toMatch(/1 later log\(s\) scored again/);
    await page.reload();
    expect(await page.locator("[data-testid=timeline]").innerText()).toMatch(
      /baseline set by Mara Quill: clean practice pack/,
    );
    expect(await page.locator("body").innerText()).toMatch(/new (pitch|roll) peak at 1\d\d Hz/);
  });

  it("swapping a part records it on the airframe", async () => {
    await page.goto(await airframeUrl(page, "HV-02"));
    await page.click("[data-testid=swap-form] summary");
    await page.selectOption(
      "[data-testid=swap-form] select[name=position]",
      "motor 3 (rear-right)",
    );
    const spare = await page
      .locator('[data-testid=swap-form] select[name=newPartId] option:has-text("spare-motor")')
      .first()
      .getAttribute("value");
    await page.selectOption("[data-testid=swap-form] select[name=newPartId]", spare ?? "");
    await page.fill("[data-testid=swap-form] input[name=reason]", "bearing felt rough by hand");
    await page.click("[data-testid=swap-form] button[type=submit]");
    await page.waitForSelector("[data-testid=swap-form] .form-message.ok");
    await page.reload();
    const row = page.locator("[data-testid=installed-parts] tr", {
      hasText: "motor 3 (rear-right)",
    });
    expect(await row.innerText()).toMatch(/spare-motor/);
    expect(await page.locator("[data-testid=timeline]").innerText()).toMatch(
      /bearing felt rough by hand/,
    );
  });

  it("fleet, parts, events and team screens are filled", async () => {
    for (const [path, name, needle] of [
      ["/fleet", "fleet", /HV-08/],
      ["/parts", "parts", /low stock|spare-arm/],
      ["/events", "events", /Winter Series round 1/],
      ["/team", "team", /API tokens/],
    ] as const) {
      await page.goto(`${app.url}${path}`);
      expect(await page.locator("main").innerText()).toMatch(needle);
      await shot(page, name);
    }
    await page.goto(`${app.url}/fleet`);
    // Charts draw after hydration.
    await expect
      .poll(() => page.locator("[data-testid=sparkline]").count(), { timeout: 15_000 })
      .toBeGreaterThan(4);
  });

  it("an API token uploads a log and reads the queue and an airframe", async () => {
    await page.goto(`${app.url}/team`);
    await page.fill("[data-testid=token-form] input[name=name]", "pit script");
    await page.click("[data-testid=token-form] button[type=submit]");
    const token = (await page.locator("[data-testid=new-token]").innerText()).trim();
    const auth = { authorization: `Bearer ${token}` };
    const queue = (await (await fetch(`${app.url}/api/v1/queue`, { headers: auth })).json()) as {
      airframe: string;
      status: string;
      reasons: string[];
    }[];
    expect(queue[0]).toMatchObject({ airframe: expect.any(String), status: "ground" });
    const form = new FormData();
    form.append("airframe", "HV-08");
    form.append(
      "file",
      new Blob([
        demoCsv(
          { seed: 903, durationS: 12, sampleRateHz: 2000, airframeSeed: 7 },
          { airframe: "HV-08" },
        ),
      ]),
      "scripted.csv",
    );
    const up = await fetch(`${app.url}/api/v1/logs`, { method: "POST", headers: auth, body: form });
    expect(up.status).toBe(200);
    const rec = (await (
      await fetch(`${app.url}/api/v1/airframes/HV-08`, { headers: auth })
    ).json()) as { name: string; parts: unknown[]; logs: { fileName: string }[] };
    expect(rec.name).toBe("HV-08");
    expect(rec.parts).toHaveLength(16);
    expect(rec.logs.map((l) => l.fileName)).toContain("scripted.csv");
    expect(
      (
        await fetch(`${app.url}/api/v1/queue`, {
          headers: { authorization: "Bearer hc_not-a-token" },
        })
      ).status,
    ).toBe(401);
  });
});

describe("a viewer", () => {
  it("sees everything and can change nothing", async () => {
    const { context, page } = await signedIn("viewer@heatcheck.test", "pitwall-viewer-2026", 1024);
    await page.goto(await airframeUrl(page, "HV-05"));
    expect(await page.locator("body").innerText()).toMatch(
      /can view this airframe but not change it/,
    );
    expect(await page.locator("details.action").count()).toBe(0);
    expect(await page.locator('button:has-text("Re-run analysis")').count()).toBe(0);
    await shot(page, "airframe-viewer-tablet");
    await page.goto(`${app.url}/upload`);
    expect(await page.locator("main").innerText()).toMatch(/cannot upload|not upload/);
    // The server refuses too, whatever the screen shows.
    const cookies = (await context.cookies()).map((c) => `${c.name}=${c.value}`).join("; ");
    const form = new FormData();
    form.append("file", new Blob(["time_us,gyro_roll,gyro_pitch,gyro_yaw\n"]), "v.csv");
    const r = await fetch(`${app.url}/api/v1/logs`, {
      method: "POST",
      headers: { cookie: cookies },
      body: form,
    });
    expect(r.status).toBe(403);
    await page.goto(`${app.url}/team`);
    expect(await page.locator("main").innerText()).toMatch(/managed by the team's owners/);
    // Their own password is theirs to change.
    await page.click("[data-testid=account] summary");
    await page.fill("[data-testid=account] input[name=current]", "pitwall-viewer-2026");
    await page.fill("[data-testid=account] input[name=next]", "pitwall-viewer-2027");
    await page.fill("[data-testid=account] input[name=confirm]", "pitwall-viewer-2027");
    await page.click('[data-testid=account] button:has-text("Change password")');
    await expect
      .poll(() => page.locator("[data-testid=account] .form-message").innerText())
      .toMatch(/Password changed/);
    await context.close();
  });
});

describe("keyboard", () => {
  let page: Page;
  let context: BrowserContext;
  beforeAll(async () => {
    ({ context, page } = await signedIn("tech@heatcheck.test", "pitwall-tech-2026", 1366));
  });
  afterAll(async () => context.close());

  it("Tab reaches every action of the queue in order, each with a visible focus ring", async () => {
    await page.goto(`${app.url}/`);
    await page.waitForSelector("[data-testid=queue] > li");
    const actions = await markActions(page);
    // The nav, sign-out, the filter chips, print, and one link per airframe in the queue.
    expect(actions.length).toBeGreaterThanOrEqual(6 + 1 + 2 + 9);
    const stops = await tabThrough(page, actions.length - 1, actions.length + 5);
    expect(stops.map((s) => s.index)).toEqual(actions.map((_, i) => i));
    expect(stops.filter((s) => !ringShown(s))).toEqual([]);
    // A person looks at the ring: focus on the first airframe's link.
    await page.focus("[data-testid=queue] > li a");
    await page.keyboard.press("Shift+Tab");
    await page.keyboard.press("Tab");
    await shot(page, "queue-focus");
  });

  it("the crash form opens and fills from the keyboard, each field ringed in turn", async () => {
    await page.goto(await airframeUrl(page, "HV-02"));
    await page.focus("[data-testid=crash-form] summary");
    await page.keyboard.press("Enter");
    expect(await page.locator("[data-testid=crash-form][open]").count()).toBe(1);
    const actions = await markActions(page, "[data-testid=crash-form]");
    // The summary, severity, the damage checkboxes, the note and the submit button at least.
    expect(actions.length).toBeGreaterThanOrEqual(5);
    expect(actions.at(-1)).toMatch(/crash/i);
    const stops = await tabThrough(page, actions.length - 1, actions.length + 20);
    expect(stops.map((s) => s.index)).toEqual(actions.map((_, i) => i).slice(1));
    expect(stops.filter((s) => !ringShown(s))).toEqual([]);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.locator("[data-testid=crash-form] select[name=severity]").focus();
    await page.keyboard.press("Shift+Tab");
    await page.keyboard.press("Tab");
    await page
      .locator("[data-testid=crash-form]")
      .screenshot({ path: join(SHOTS, "crash-form-focus-phone.png") });
    await page.setViewportSize({ width: 1366, height: 900 });
  });
});

// Last, because it removes a member and breaks one stored row to reach the welcome and error screens.
describe("accessibility: axe-core finds nothing on any screen, at 1366 and 390 px", () => {
  it("every screen and every upload step, and every action on them shows a focus ring", async () => {
    const found: AxeFinding[] = [];
    // And on each screen, every action draws its focus ring.
    const unringed: string[] = [];
    const visit = async (page: Page, screen: string, url: string, ready?: string) => {
      await page.goto(url);
      if (ready) await page.waitForSelector(ready);
      found.push(...(await axeAtWidths(page, screen)));
      unringed.push(...(await unringedActions(page)).map((a) => `${screen}: ${a}`));
    };

    const out = await browser.newPage();
    await visit(out, "sign-in", `${app.url}/signin`);
    await visit(out, "not-found (signed out)", `${app.url}/no-such-screen`);
    await out.close();

    const { context, page } = await signedIn("owner@heatcheck.test", "pitwall-owner-2026");
    await visit(page, "queue", `${app.url}/`, "[data-testid=queue] > li");
    await visit(page, "fleet", `${app.url}/fleet`, "[data-testid=sparkline]");
    const airframe = await airframeUrl(page, "HV-03");
    await visit(page, "airframe", airframe, "[data-testid=trend-modes] svg path.recharts-curve");
    const logHref = await page.locator("a:has-text('Open the latest log')").getAttribute("href");
    await visit(
      page,
      "log",
      `${app.url}${logHref ?? ""}`,
      "[data-testid=motor-orders] svg path.recharts-curve",
    );
    await visit(page, "parts", `${app.url}/parts`);
    await visit(page, "events", `${app.url}/events`);
    await visit(page, "team", `${app.url}/team`);
    await visit(page, "not-found (team)", `${app.url}/logs/not-a-log-id`);
    await visit(page, "not-found (signed in)", `${app.url}/no-such-screen`);

    // The upload steps: choose files, the column map, progress, the verdict.
    await visit(page, "upload: choose files", `${app.url}/upload`);
    const file = join(app.dataDir, "HV-08 axe logger.csv");
    writeFileSync(file, foreignLog(906));
    await page.setInputFiles("[data-testid=file-input]", [file]);
    await page.waitForSelector("[data-testid=map-table]");
    found.push(...(await axeAtWidths(page, "upload: column map")));
    await page.click("[data-testid=import-all]");
    await page.waitForSelector(
      '[data-testid=upload-list] tr:is([data-phase="uploading"], [data-phase="analysing"], [data-phase="done"])',
    );
    found.push(...(await axeAtWidths(page, "upload: progress")));
    await page.waitForSelector('[data-testid=upload-list] tr[data-phase="done"]', {
      timeout: 60_000,
    });
    found.push(...(await axeAtWidths(page, "upload: verdict")));
    for (const width of [1366, 390]) {
      await page.setViewportSize({ width, height: 900 });
      await shot(page, `upload-verdict-${width}`);
    }
    await page.setViewportSize({ width: 1440, height: 900 });

    // The error screen: one stored analysis this version cannot read.
    const db = openSqlite(join(app.dataDir, "heatcheck.db"));
    const broken = db
      .prepare(
        "SELECT l.id AS id FROM FlightLog l JOIN Analysis a ON a.logId = l.id JOIN Airframe f ON f.id = l.airframeId WHERE f.name = 'HV-08' LIMIT 1",
      )
      .get();
    db.prepare("UPDATE Analysis SET json = '{' WHERE logId = ?").run(broken?.id);
    // The welcome screen: a person whose only membership has ended.
    db.prepare(
      "DELETE FROM Membership WHERE userId = (SELECT id FROM User WHERE email = 'pilot@heatcheck.test')",
    ).run();
    db.close();
    await visit(page, "error", `${app.url}/logs/${String(broken?.id)}`, "[role=alert]");
    await context.close();

    const pilot = await browser.newPage();
    await pilot.goto(`${app.url}/signin`);
    await pilot.fill("input[name=email]", "pilot@heatcheck.test");
    await pilot.fill("input[name=password]", "pitwall-pilot-2026");
    await pilot.click("button[type=submit]");
    await pilot.waitForURL(/\/welcome$/);
    found.push(...(await axeAtWidths(pilot, "welcome (no team)")));
    await pilot.close();

    expect(describeFindings(found)).toBe("");
    expect(unringed).toEqual([]);
  }, 180_000);
});
