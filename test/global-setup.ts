/**
 * Vitest global setup: make sure dist/ holds a production build of the current sources, since
 * the host-faithful tests load dist/functions.js. Builds only when dist is missing or older
 * than any source file (CI builds first, so this is then a no-op).
 */
import { execSync } from "node:child_process";
import { existsSync, readdirSync, statSync } from "node:fs";
import { join, resolve } from "node:path";

function newest(dir: string): number {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    t = Math.max(t, e.isDirectory() ? newest(p) : statSync(p).mtimeMs);
  }
  return t;
}

export default function setup(): void {
  const root = resolve(__dirname, "..");
  const built = resolve(root, "dist/functions.js");
  const stale = !existsSync(built) || statSync(built).mtimeMs < Math.max(newest(resolve(root, "src")), statSync(resolve(root, "webpack.config.js")).mtimeMs, statSync(resolve(root, "manifest.xml")).mtimeMs, statSync(resolve(root, "README.md")).mtimeMs);
  if (stale) {
    console.log("global setup: building dist/ (production) for the host-faithful tests…");
    execSync("npm run build", { cwd: root, stdio: "inherit" });
  }
}
