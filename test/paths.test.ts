/**
 * The scripts run from a folder whose path has a space in it (paths come from fileURLToPath, not
 * URL.pathname): a local clone under such a folder resolves its own root, and the WebAssembly
 * module check runs there.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, symlinkSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";

const root = resolve(__dirname, "..");

describe("npm start's scripts in a folder with a space", () => {
  it("start.mjs --dry-run and build-wasm.mjs --check work from a clone under 'Colspace clone'", () => {
    const base = mkdtempSync(join(tmpdir(), "colspace paths "));
    const clone = join(base, "Colspace clone");
    try {
      execFileSync("git", ["clone", "-q", "--no-hardlinks", root, clone]);
      symlinkSync(join(root, "node_modules"), join(clone, "node_modules"), "dir");
      const out = execFileSync(process.execPath, [join(clone, "scripts/start.mjs"), "--dry-run"], { encoding: "utf8", env: { ...process.env, COLSPACE_CERT_DIR: join(base, "certs") } });
      const info = JSON.parse(out.trim().split("\n").pop()!) as { root: string; manifest: string; host: string };
      expect(info.root).toBe(clone);
      expect(info.manifest).toBe(join(clone, "manifest.xml"));
      expect(info.host).toBe("localhost");
      execFileSync(process.execPath, [join(clone, "scripts/build-wasm.mjs"), "--check"], { encoding: "utf8" });
    } finally {
      rmSync(base, { recursive: true, force: true });
    }
  }, 60_000);
});
