import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS } from "@/lib/demo/accounts";
import { DECISION_AID_NOTE, SAFETY_CAUTIONS } from "@/lib/health/safety";
import { actorRef, ROLE_DESCRIPTIONS, ROLES } from "@/lib/roles";

// Texts that are written once in the code and quoted by the README: the quote must not drift.
// (Whitespace and Markdown emphasis are ignored; the words are compared exactly.)

const plain = (s: string) => s.replace(/\*\*/g, "").replace(/\s+/g, " ");
const readme = plain(readFileSync(join(process.cwd(), "README.md"), "utf8"));

describe("one source for repeated texts", () => {
  it("the README's safety section quotes lib/health/safety.ts word for word", () => {
    expect(readme).toContain(DECISION_AID_NOTE);
    for (const caution of SAFETY_CAUTIONS) expect(readme).toContain(caution);
  });

  it("the README's roles sentence quotes lib/roles.ts", () => {
    for (const role of ROLES) expect(readme).toContain(`${role} ${ROLE_DESCRIPTIONS[role]}`);
  });

  it("the README's demo sign-in table lists every demo account of lib/demo/accounts.ts", () => {
    for (const a of DEMO_ACCOUNTS) {
      expect(readme).toContain(`\`${a.email}\``);
      expect(readme).toContain(`\`${a.password}\``);
    }
  });

  it('an actor is referred to by its user id, an API token as "token"', () => {
    expect(actorRef({ userId: "u1" })).toBe("u1");
    expect(actorRef({ userId: null })).toBe("token");
  });
});
