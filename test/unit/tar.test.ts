import { execFileSync } from "node:child_process";
import {
  createReadStream,
  createWriteStream,
  mkdirSync,
  mkdtempSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from "node:fs";
import { tmpdir } from "node:os";
import { Readable } from "node:stream";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { readTar, safeEntryName, TarWriter } from "@/lib/archive/tar";

// The archive format is POSIX ustar (IEEE Std 1003.1-1988); the outside reference is Debian's GNU
// tar, which must list and extract what we write, and whose --format=ustar output we must read.
// Byte-for-byte equality of contents is the tolerance (none).

const dir = mkdtempSync(join(tmpdir(), "heatcheck-tar-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const longName = `uploads/${"team-".repeat(12)}x/${"a".repeat(64)}.csv`; // > 100 bytes: needs the ustar prefix field

describe("ustar", () => {
  it("GNU tar extracts what TarWriter writes, byte for byte", async () => {
    const archive = join(dir, "ours.tar");
    const src = join(dir, "src.bin");
    const payload = Buffer.alloc(70_001);
    for (let i = 0; i < payload.length; i++) payload[i] = (i * 31 + 7) & 0xff;
    writeFileSync(src, payload);
    const out = createWriteStream(archive);
    const tar = new TarWriter(out);
    await tar.bytes("manifest.json", '{"a":1}\n');
    await tar.directory("uploads");
    await tar.file(longName, src);
    await tar.bytes("empty.txt", "");
    await tar.end();
    expect(execFileSync("tar", ["-tf", archive]).toString().trim().split("\n")).toEqual([
      "manifest.json",
      "uploads/",
      longName,
      "empty.txt",
    ]);
    const x = join(dir, "x");
    mkdirSync(x);
    execFileSync("tar", ["-xf", archive, "-C", x]);
    expect(readFileSync(join(x, longName)).equals(payload)).toBe(true);
    expect(readFileSync(join(x, "manifest.json"), "utf8")).toBe('{"a":1}\n');
  });

  it("readTar reads GNU tar's ustar output, byte for byte", async () => {
    const src = join(dir, "g");
    mkdirSync(join(src, "sub"), { recursive: true });
    writeFileSync(join(src, "sub", "one.csv"), "time_us,gyro_roll\n0,1\n");
    writeFileSync(join(src, "two.bin"), Buffer.alloc(1025, 9));
    const archive = join(dir, "gnu.tar");
    execFileSync("tar", ["--format=ustar", "-cf", archive, "-C", src, "sub", "two.bin"]);
    const seen: Record<string, Buffer> = {};
    await readTar(createReadStream(archive, { highWaterMark: 100 }), async (entry, body) => {
      const parts: Buffer[] = [];
      for await (const c of body) parts.push(Buffer.from(c));
      seen[`${entry.type}:${entry.name}`] = Buffer.concat(parts);
    });
    expect(Object.keys(seen).sort()).toEqual(["directory:sub", "file:sub/one.csv", "file:two.bin"]);
    expect(seen["file:sub/one.csv"]?.toString()).toBe("time_us,gyro_roll\n0,1\n");
    expect(seen["file:two.bin"]?.equals(Buffer.alloc(1025, 9))).toBe(true);
  });

  it("refuses names that would land outside the target folder", () => {
    for (const bad of ["/etc/passwd", "../x", "a/../../b", "C:/x", ""])
      expect(() => safeEntryName(bad)).toThrow(/unsafe path/);
    expect(safeEntryName("./uploads/a.csv")).toBe("uploads/a.csv");
  });

  it("a damaged header is refused with a sentence", async () => {
    const archive = join(dir, "ours.tar");
    const bytes = readFileSync(archive);
    bytes[10] = (bytes[10] ?? 0) ^ 0xff;
    await expect(readTar(Readable.from([bytes]), () => Promise.resolve())).rejects.toThrow(
      /checksum/,
    );
  });
});
