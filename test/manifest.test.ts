/**
 * manifest.xml and functions.json against the Office add-in rules (DEVELOPERS.md "Host
 * requirements" names the documentation page behind each rule):
 * - the built dist/manifest.xml validates against the add-in manifest XSDs (../shared/refdata/
 *   office-manifest-schemas, read from there; skipped with a notice where absent) with Debian's
 *   xmllint;
 * - what a schema cannot see: every resid defined in the right resource list and at most 32
 *   characters, icon files of the pixel sizes the manifest claims, no TaskpaneId beside a shared
 *   runtime, no development address in a production build, a tab of our own;
 * - functions.json: ids of letters, digits and periods; matrix results for functions that ask for
 *   parameter addresses; no data-type flag the add-in does not use.
 */
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { OfficeAddinManifest } from "office-addin-manifest";

const root = resolve(__dirname, "..");
const path = resolve(root, "manifest.xml");
const built = resolve(root, "dist/manifest.xml");
/** The manifest without its comments (the checks read elements, not prose). */
const xml = readFileSync(path, "utf8").replace(/<!--[\s\S]*?-->/g, "");
const SCHEMAS = resolve(root, "../shared/refdata/office-manifest-schemas");
const hasXmllint = spawnSync("xmllint", ["--version"]).status === 0;

/** Width and height of a PNG file, from its IHDR chunk. */
function pngSize(file: string): [number, number] {
  const b = readFileSync(file);
  expect(b.subarray(1, 4).toString("latin1"), `${file} is a PNG`).toBe("PNG");
  return [b.readUInt32BE(16), b.readUInt32BE(20)];
}

describe("manifest.xml", () => {
  it.skipIf(!existsSync(SCHEMAS) || !hasXmllint)("the built manifest validates against the add-in manifest schemas (xmllint)", () => {
    const r = spawnSync("xmllint", ["--noout", "--schema", join(SCHEMAS, "OfficeAppManifestV1_1.xsd"), built], { encoding: "utf8" });
    expect(r.stderr.trim(), r.stderr).toMatch(/validates$/);
    expect(r.status).toBe(0);
  });
  if (!existsSync(SCHEMAS) || !hasXmllint) console.log(`NOTICE: manifest schema validation skipped (${!existsSync(SCHEMAS) ? `no ${SCHEMAS}` : "xmllint not installed: apt-get install libxml2-utils"}).`);

  it("parses with office-addin-manifest", async () => {
    const info = await OfficeAddinManifest.readManifestFile(path);
    expect(info.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(info.displayName).toBe("Colspace least squares");
    expect(info.hosts).toContain("Workbook");
  });
  it("runs custom functions and the pane in one shared runtime, with no TaskpaneId (it can open a second pane)", () => {
    expect(xml).toMatch(/<Runtime resid="Taskpane.Url" lifetime="long"\/>/);
    expect(xml).toMatch(/<Set Name="SharedRuntime" MinVersion="1.1"\/>/);
    const page = /<ExtensionPoint xsi:type="CustomFunctions">[\s\S]*?<Page>\s*<SourceLocation resid="([^"]+)"/.exec(xml)?.[1];
    expect(page).toBe("Taskpane.Url");
    expect(xml).toMatch(/<FunctionFile resid="Taskpane.Url"\/>/);
    expect(xml).not.toMatch(/TaskpaneId/i);
  });
  it("requires the custom-functions runtime the add-in uses (parameter addresses and ErrorCode: 1.3)", () => {
    expect(xml).toMatch(/<Set Name="CustomFunctionsRuntime" MinVersion="1.3"\/>/);
  });
  it("puts its button on a tab of its own, not on a built-in tab", () => {
    expect(xml).toMatch(/<CustomTab id="Colspace.Tab">/);
    expect(xml).not.toMatch(/<OfficeTab/);
  });
  it("declares the LSQ namespace and the permissions the pane needs", () => {
    expect(xml).toMatch(/<bt:String id="Functions.Namespace" DefaultValue="LSQ"\/>/);
    expect(xml).toMatch(/<Permissions>ReadWriteDocument<\/Permissions>/);
  });
  it("uses https URLs only, and no AppDomains", () => {
    const urls = [...xml.matchAll(/DefaultValue="(https?:[^"]+)"/g)].map((m) => m[1]!);
    expect(urls.length).toBeGreaterThan(5);
    for (const u of urls) expect(u).toMatch(/^https:\/\/localhost:3000\//);
    expect(xml).not.toMatch(/AppDomain/);
  });
  it("defines every resid in the right resource list, each id at most 32 characters", () => {
    const list = (kind: string): Set<string> => new Set([...xml.matchAll(new RegExp(`<bt:${kind} id="([^"]+)"`, "g"))].map((m) => m[1]!));
    const images = list("Image");
    const urls = list("Url");
    const short = new Set([...(xml.split("<bt:ShortStrings>")[1]?.split("</bt:ShortStrings>")[0] ?? "").matchAll(/<bt:String id="([^"]+)"/g)].map((m) => m[1]!));
    const long = new Set([...(xml.split("<bt:LongStrings>")[1]?.split("</bt:LongStrings>")[0] ?? "").matchAll(/<bt:String id="([^"]+)"/g)].map((m) => m[1]!));
    for (const id of [...images, ...urls, ...short, ...long]) expect(id.length, id).toBeLessThanOrEqual(32);
    for (const m of xml.matchAll(/<(\w+:?\w*)[^>]*\bresid="([^"]+)"/g)) {
      const [, tag, id] = m as unknown as [string, string, string];
      const want = tag === "bt:Image" ? images : tag === "SourceLocation" || tag === "Runtime" || tag === "FunctionFile" || tag === "LearnMoreUrl" ? urls : tag === "Description" ? long : short;
      expect(want.has(id), `${tag} resid="${id}" must be defined in its list`).toBe(true);
    }
  });
  it("icon files have the pixel sizes the manifest claims (the high-resolution icon is 64 × 64)", () => {
    const hi = /<HighResolutionIconUrl DefaultValue="https:\/\/localhost:3000\/([^"]+)"/.exec(xml)![1]!;
    expect(pngSize(resolve(root, hi))).toEqual([64, 64]);
    const icon = /<IconUrl DefaultValue="https:\/\/localhost:3000\/([^"]+)"/.exec(xml)![1]!;
    expect(pngSize(resolve(root, icon))).toEqual([32, 32]);
    for (const m of xml.matchAll(/<bt:Image size="(\d+)" resid="([^"]+)"\/>/g)) {
      const file = new RegExp(`<bt:Image id="${m[2]!.replace(".", "\\.")}" DefaultValue="https://localhost:3000/([^"]+)"`).exec(xml)![1]!;
      expect(pngSize(resolve(root, file)), file).toEqual([Number(m[1]), Number(m[1])]);
    }
  });
  it("references only files the build produces", () => {
    const files = [...xml.matchAll(/DefaultValue="https:\/\/localhost:3000\/([^"#]+)"/g)].map((m) => m[1]!);
    for (const f of new Set(files)) expect(existsSync(resolve(root, "dist", f)), f).toBe(true);
  });
  it("a production build for another address carries no development address", () => {
    // The build's own manifest step (webpack.config.js, copy transform) with PUBLIC_URL set.
    const was = process.env.PUBLIC_URL;
    process.env.PUBLIC_URL = "https://example.org/colspace/";
    try {
      const make = require(resolve(root, "webpack.config.js")) as (env: unknown, argv: { mode: string }) => { plugins: { patterns?: { to: string; transform?: (c: Buffer) => string }[] }[] };
      const config = make({}, { mode: "production" });
      const pattern = config.plugins.flatMap((p) => p.patterns ?? []).find((p) => p.to === "manifest.xml")!;
      const prod = pattern.transform!(readFileSync(path));
      expect(prod).not.toContain("localhost");
      expect(prod).toContain("https://example.org/colspace/taskpane.html");
    } finally {
      if (was === undefined) delete process.env.PUBLIC_URL;
      else process.env.PUBLIC_URL = was;
    }
  });
});

describe("functions.json (custom functions metadata rules)", () => {
  const meta = JSON.parse(readFileSync(resolve(root, "dist/functions.json"), "utf8")) as {
    allowErrorForDataTypeAny?: boolean;
    allowCustomDataForDataTypeAny?: boolean;
    functions: { id: string; name: string; options?: Record<string, boolean>; result: { dimensionality?: string }; parameters: { type?: string; cellValueType?: string }[] }[];
  };
  it("has no data-type flag (needs CustomFunctionsRuntime 1.4, absent from Office 2021) and accepts error values", () => {
    expect("allowCustomDataForDataTypeAny" in meta).toBe(false);
    expect(meta.allowErrorForDataTypeAny).toBe(true);
    for (const f of meta.functions) for (const p of f.parameters) expect(p.cellValueType, f.id).toBeUndefined();
  });
  it("ids are letters, digits and periods, and unique", () => {
    const ids = meta.functions.map((f) => f.id);
    for (const id of ids) expect(id).toMatch(/^[A-Za-z0-9.]+$/);
    expect(new Set(ids).size).toBe(ids.length);
  });
  it("every function that asks for parameter addresses returns a matrix", () => {
    for (const f of meta.functions) if (f.options?.requiresParameterAddresses) expect(f.result.dimensionality, f.id).toBe("matrix");
  });
  it("uses no option the add-in does not need (streaming, volatile, cancelable)", () => {
    for (const f of meta.functions) for (const o of ["stream", "volatile", "cancelable"]) expect(f.options?.[o], `${f.id}.${o}`).toBeFalsy();
  });
});
