/**
 * Signs in over plain HTTP the way a browser does with next-auth's credentials provider: fetch the
 * CSRF token (and its cookie), post the form, keep the session cookie. For tests that check a
 * server's answers without a browser.
 */
export class HttpSession {
  private readonly cookies = new Map<string, string>();

  constructor(readonly baseUrl: string) {}

  private keep(r: Response): void {
    for (const line of r.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair?.indexOf("=") ?? -1;
      if (pair && eq > 0) this.cookies.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
    }
  }

  get cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }

  async get(path: string): Promise<Response> {
    const r = await fetch(`${this.baseUrl}${path}`, {
      headers: { cookie: this.cookieHeader },
      redirect: "manual",
    });
    this.keep(r);
    return r;
  }

  /** True when the server issued a session cookie for these credentials. */
  async signIn(email: string, password: string): Promise<boolean> {
    const csrf = await this.get("/api/auth/csrf");
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };
    const r = await fetch(`${this.baseUrl}/api/auth/callback/credentials`, {
      method: "POST",
      headers: {
        "content-type": "application/x-www-form-urlencoded",
        cookie: this.cookieHeader,
        origin: this.baseUrl,
      },
      body: new URLSearchParams({
        csrfToken,
        email,
        password,
        callbackUrl: `${this.baseUrl}/`,
      }).toString(),
      redirect: "manual",
    });
    this.keep(r);
    return [...this.cookies.keys()].some((k) => k.endsWith("next-auth.session-token"));
  }
}
