// `npm start`: development build + https dev server on https://localhost:3000.
// Creates (or reuses) development certificates without sudo, then prints the manifest to
// sideload and the preview address. Works on a machine without a desktop spreadsheet: open the
// preview address in a browser.
import { existsSync, mkdirSync } from "node:fs";
import { homedir } from "node:os";
import { join, resolve } from "node:path";
import { spawn } from "node:child_process";
import { createRequire } from "node:module";

const require = createRequire(import.meta.url);
const root = resolve(new URL("..", import.meta.url).pathname);
const certDir = process.env.COLSPACE_CERT_DIR || join(homedir(), ".office-addin-dev-certs");

async function ensureCerts() {
  const files = ["ca.crt", "localhost.crt", "localhost.key"].map((f) => join(certDir, f));
  if (files.every(existsSync)) return "reused";
  mkdirSync(certDir, { recursive: true });
  const certs = require("office-addin-dev-certs");
  // generateCertificates needs no sudo (the package's install step would try to trust the CA system-wide).
  await certs.generateCertificates(files[0], files[1], files[2], 30, ["localhost", "127.0.0.1"]);
  return "created";
}

const how = await ensureCerts().catch((e) => {
  console.error(`Could not create development certificates in ${certDir}: ${e.message}`);
  process.exit(1);
});
console.log(`Development certificates ${how} in ${certDir}`);
console.log("To trust them in your browser, import ca.crt from that folder (optional; the preview also works after accepting the warning).");

const webpackCli = require.resolve("webpack-cli/bin/cli.js");
const child = spawn(process.execPath, [webpackCli, "serve", "--mode", "development"], {
  cwd: root,
  stdio: ["inherit", "pipe", "inherit"],
  env: { ...process.env, COLSPACE_CERT_DIR: certDir },
});
let announced = false;
child.stdout.on("data", (d) => {
  process.stdout.write(d);
  if (!announced && /compiled/i.test(d.toString())) {
    announced = true;
    console.log("\n────────────────────────────────────────────────────────────");
    console.log(" Colspace is running on https://localhost:3000");
    console.log(" Preview (any browser, no spreadsheet needed): https://localhost:3000/taskpane.html");
    console.log(` Manifest to sideload in Excel:               ${join(root, "manifest.xml")}`);
    console.log("   (Excel on the web: Home › Add-ins › More add-ins › Upload my add-in.)");
    console.log(" Stop with Ctrl+C.");
    console.log("────────────────────────────────────────────────────────────\n");
  }
});
child.on("exit", (code) => process.exit(code ?? 0));
for (const s of ["SIGINT", "SIGTERM"]) process.on(s, () => child.kill(s));
