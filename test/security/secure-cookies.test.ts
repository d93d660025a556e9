import { describe, expect, it, vi } from "vitest";

// Issue 7 item 13: behind HTTPS the team cookie follows the session cookie's rules. next-auth
// names its session cookie "__Secure-next-auth.session-token" and marks it Secure when NEXTAUTH_URL
// starts with https:// (next-auth v4 docs, "cookies" option); the __Secure- prefix makes a browser
// refuse the cookie unless it is Secure and set over HTTPS (RFC 6265bis §4.1.3.1).
describe("team cookie behind HTTPS", () => {
  it("is Secure with the __Secure- prefix when NEXTAUTH_URL is https, plain on http", async () => {
    const saved = process.env.NEXTAUTH_URL;
    try {
      process.env.NEXTAUTH_URL = "https://pits.example.test";
      vi.resetModules();
      const secure = await import("@/lib/server/guard");
      expect(secure.TEAM_COOKIE).toBe("__Secure-hc-team");
      expect(secure.TEAM_COOKIE_OPTIONS).toMatchObject({
        secure: true,
        httpOnly: true,
        sameSite: "lax",
      });
      process.env.NEXTAUTH_URL = "http://127.0.0.1:3000";
      vi.resetModules();
      const plain = await import("@/lib/server/guard");
      expect(plain.TEAM_COOKIE).toBe("hc-team");
      expect(plain.TEAM_COOKIE_OPTIONS.secure).toBe(false);
    } finally {
      process.env.NEXTAUTH_URL = saved;
    }
  });
});
