// `npm start`: development build + https dev server on https://localhost:3000 (bound to
// localhost only), then the manifest to sideload and the preview address, printed once.
//
// Certificates: a desktop host cannot click through a certificate warning, so on Windows and
// macOS the development certificate authority is installed and trusted with office-addin-dev-certs
// (the system asks for permission: that prompt is expected). On Linux there is no desktop Excel:
// the certificates are created without sudo for Excel on the web and the preview, which a browser
// can be told to trust (import ca.crt) or accept once.
//
//   node scripts/start.mjs --dry-run   resolve paths and certificates, print them, serve nothing
import { existsSync, mkdirSync } from "node:fs";
import { homedir, platform } from "node:os";
import { join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { spawn } from "node:child_process";
import { createRequire } from "node:module";

const require = createRequire(import.meta.url);
// fileURLToPath, not URL.pathname: a folder with a space or a Windows drive letter stays a path.
const root = resolve(fileURLToPath(new URL("..", import.meta.url)));
const dry = process.argv.includes("--dry-run");
const desktop = platform() === "win32" || platform() === "darwin";
const certDir = process.env.COLSPACE_CERT_DIR || join(homedir(), ".office-addin-dev-certs");
const HOST = "localhost";
const PORT = 3000;

async function ensureCerts() {
  const files = ["ca.crt", "localhost.crt", "localhost.key"].map((f) => join(certDir, f));
  const certs = require("office-addin-dev-certs");
  if (desktop && !process.env.COLSPACE_CERT_DIR) {
    // Creates the files in the package's default folder (= certDir) and trusts the authority.
    await certs.ensureCertificatesAreInstalled(30, ["localhost", "127.0.0.1"]);
    return "installed and trusted";
  }
  if (files.every(existsSync)) return "reused";
  mkdirSync(certDir, { recursive: true });
  // generateCertificates needs no sudo (the install step would try to trust the authority system-wide).
  await certs.generateCertificates(files[0], files[1], files[2], 30, ["localhost", "127.0.0.1"]);
  return "created";
}

const how = dry ? "not touched (dry run)" : await ensureCerts().catch((e) => {
  console.error(`Could not prepare development certificates in ${certDir}: ${e.message}`);
  process.exit(1);
});
const certNote = desktop
  ? `Development certificates ${how} in ${certDir}.`
  : `Development certificates ${how} in ${certDir}. On Linux, Excel on the web and the preview are what apply; to avoid the browser's warning, import ca.crt from that folder as a trusted authority (or accept the warning once).`;

if (dry) {
  console.log(JSON.stringify({ root, manifest: join(root, "manifest.xml"), certDir, host: HOST, port: PORT, desktop }));
  process.exit(0);
}

const webpackCli = require.resolve("webpack-cli/bin/cli.js");
const child = spawn(process.execPath, [webpackCli, "serve", "--mode", "development"], {
  cwd: root,
  stdio: ["inherit", "pipe", "inherit"],
  env: { ...process.env, COLSPACE_CERT_DIR: certDir, COLSPACE_HOST: HOST },
});
let announced = false;
child.stdout.on("data", (d) => {
  process.stdout.write(d);
  if (!announced && /compiled/i.test(d.toString())) {
    announced = true;
    console.log("\n────────────────────────────────────────────────────────────");
    console.log(` Colspace is running on https://${HOST}:${PORT} (this computer only)`);
    console.log(` Preview (any browser, no spreadsheet needed): https://${HOST}:${PORT}/taskpane.html`);
    console.log(` Manifest to sideload:                        ${join(root, "manifest.xml")}`);
    console.log("   (README \"Set up on a fresh machine\" says where, for Excel on the web, Windows and Mac.)");
    console.log(` ${certNote}`);
    console.log(" Stop with Ctrl+C.");
    console.log("────────────────────────────────────────────────────────────\n");
  }
});
child.on("exit", (code) => process.exit(code ?? 0));
for (const s of ["SIGINT", "SIGTERM"]) process.on(s, () => child.kill(s));
