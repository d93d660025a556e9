import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { join } from "node:path";

/** HTTP helpers for the security suite: a cookie jar, sign-in through next-auth, server actions. */

export class Client {
  readonly cookies = new Map<string, string>();
  constructor(
    readonly base: string,
    readonly headers: Record<string, string> = {},
  ) {}

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }

  async fetch(path: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    for (const [k, v] of Object.entries(this.headers)) if (!headers.has(k)) headers.set(k, v);
    if (this.cookies.size > 0 && !headers.has("cookie")) headers.set("cookie", this.cookieHeader());
    const r = await fetch(`${this.base}${path}`, { ...init, headers, redirect: "manual" });
    for (const line of r.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair?.indexOf("=") ?? -1;
      if (!pair || eq < 0) continue;
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      if (value === "" || /max-age=0|expires=thu, 01 jan 1970/i.test(line))
        this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    return r;
  }

  copy(): Client {
    const c = new Client(this.base, { ...this.headers });
    for (const [k, v] of this.cookies) c.cookies.set(k, v);
    return c;
  }
}

export interface SignInResult {
  ok: boolean;
  status: number;
  /** next-auth's error parameter: "CredentialsSignin" for a wrong password, else our sentence */
  error: string | null;
}

/** Signs in through next-auth's own endpoints, as the sign-in form does. */
export async function signIn(
  client: Client,
  email: string,
  password: string,
  extraHeaders: Record<string, string> = {},
): Promise<SignInResult> {
  const csrf = (await (await client.fetch("/api/auth/csrf")).json()) as { csrfToken: string };
  const body = new URLSearchParams({ email, password, csrfToken: csrf.csrfToken, json: "true" });
  const r = await client.fetch("/api/auth/callback/credentials", {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded", ...extraHeaders },
    body,
  });
  const json = (await r.json()) as { url?: string };
  const error = json.url ? new URL(json.url).searchParams.get("error") : null;
  return { ok: r.status === 200 && error === null, status: r.status, error };
}

export async function signedIn(base: string, email: string, password: string): Promise<Client> {
  const c = new Client(base);
  const r = await signIn(c, email, password);
  if (!r.ok) throw new Error(`sign-in of ${email} failed: ${r.status} ${r.error ?? ""}`);
  return c;
}

export async function signOut(client: Client): Promise<void> {
  const csrf = (await (await client.fetch("/api/auth/csrf")).json()) as { csrfToken: string };
  await client.fetch("/api/auth/signout", {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ csrfToken: csrf.csrfToken, json: "true" }),
  });
}

// React's own encoder for server-action arguments (the Flight reply format), from Next's bundle.
const require = createRequire(import.meta.url);
const flight = require("next/dist/compiled/react-server-dom-turbopack/client.edge") as {
  encodeReply: (v: unknown) => Promise<FormData | string>;
};

export interface BuiltAction {
  id: string;
  name: string;
  /** a page the action is bundled with, to post it to */
  page: string;
}

/** Every server action of the build, from `.next/server/server-reference-manifest.json`. */
export function builtActions(root: string): BuiltAction[] {
  const manifest = JSON.parse(
    readFileSync(join(root, ".next", "server", "server-reference-manifest.json"), "utf8"),
  ) as {
    node: Record<string, { workers: Record<string, unknown>; exportedName: string }>;
  };
  return Object.entries(manifest.node).map(([id, entry]) => {
    const pages = Object.keys(entry.workers)
      .map(pageUrl)
      .filter((p) => !p.includes("["));
    return { id, name: entry.exportedName, page: pages[0] ?? "/" };
  });
}

/** "app/(team)/team/page" or "/(team)/team/page" → "/team". */
export function pageUrl(entry: string): string {
  const path = entry
    .replace(/^app\//, "/")
    .replace(/\/(page|route)$/, "")
    .split("/")
    .filter((s) => s !== "" && !/^\(.*\)$/.test(s))
    .join("/");
  return `/${path}`;
}

/** Pages and route handlers of the build, from `.next/server/app-paths-manifest.json`. */
export function builtPaths(root: string): { pages: string[]; routes: string[] } {
  const manifest = JSON.parse(
    readFileSync(join(root, ".next", "server", "app-paths-manifest.json"), "utf8"),
  ) as Record<string, string>;
  const keys = Object.keys(manifest).filter((k) => !k.startsWith("/_"));
  return {
    pages: keys.filter((k) => k.endsWith("/page")).map(pageUrl),
    routes: keys.filter((k) => k.endsWith("/route")).map(pageUrl),
  };
}

/** Calls a server action the way the browser does, with an ActionForm's (previous state, form). */
export async function callAction(
  client: Client,
  action: BuiltAction,
  fields: Record<string, string> = {},
  origin?: string,
): Promise<{ status: number; text: string }> {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  const body = await flight.encodeReply([{ ok: false, message: "" }, form]);
  const r = await client.fetch(action.page, {
    method: "POST",
    headers: {
      "next-action": action.id,
      origin: origin ?? client.base,
      accept: "text/x-component",
    },
    body,
  });
  return { status: r.status, text: await r.text() };
}

/** The sentences with which the guard refuses (lib/server/guard.ts, lib/server/authorize.ts, lib/server/sessions.ts). */
export const REFUSALS = [
  /Sign in first\./,
  /Your session has ended/,
  /This needs the \w+ role or higher/,
  /came from another site/,
  /not a member of any team/,
];
