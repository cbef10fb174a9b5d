/**
 * manifest.xml: parsed with office-addin-manifest's reader (rejects malformed XML), plus structural
 * assertions: shared runtime, LSQ namespace, https URLs, every resid defined, ReadWriteDocument.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { OfficeAddinManifest } from "office-addin-manifest";

const path = resolve(__dirname, "../manifest.xml");
const xml = readFileSync(path, "utf8");

describe("manifest.xml", () => {
  it("parses with office-addin-manifest", async () => {
    const info = await OfficeAddinManifest.readManifestFile(path);
    expect(info.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(info.displayName).toBe("Colspace least squares");
    expect(info.hosts).toContain("Workbook");
  });
  it("runs custom functions and the pane in one shared runtime", () => {
    expect(xml).toMatch(/<Runtime resid="Taskpane.Url" lifetime="long"\/>/);
    expect(xml).toMatch(/<Set Name="SharedRuntime" MinVersion="1.1"\/>/);
    const page = /<ExtensionPoint xsi:type="CustomFunctions">[\s\S]*?<Page>\s*<SourceLocation resid="([^"]+)"/.exec(xml)?.[1];
    expect(page).toBe("Taskpane.Url");
    expect(xml).toMatch(/<FunctionFile resid="Taskpane.Url"\/>/);
  });
  it("declares the LSQ namespace and the permissions the pane needs", () => {
    expect(xml).toMatch(/<bt:String id="Functions.Namespace" DefaultValue="LSQ"\/>/);
    expect(xml).toMatch(/<Permissions>ReadWriteDocument<\/Permissions>/);
  });
  it("uses https URLs only", () => {
    const urls = [...xml.matchAll(/DefaultValue="(https?:[^"]+)"/g)].map((m) => m[1]!);
    expect(urls.length).toBeGreaterThan(5);
    for (const u of urls) expect(u).toMatch(/^https:\/\/localhost:3000\//);
  });
  it("defines every resid it references, and references files the build produces", () => {
    const used = new Set([...xml.matchAll(/resid="([^"]+)"/g)].map((m) => m[1]!));
    const defined = new Set([...xml.matchAll(/<bt:(?:Image|Url|String) id="([^"]+)"/g)].map((m) => m[1]!));
    for (const r of used) expect(defined.has(r), r).toBe(true);
    const files = [...xml.matchAll(/DefaultValue="https:\/\/localhost:3000\/([^"#]+)"/g)].map((m) => m[1]!);
    const dist = resolve(__dirname, "../dist");
    for (const f of new Set(files)) expect(() => readFileSync(resolve(dist, f)), f).not.toThrow();
  });
  it("the built manifest takes the deployment address from PUBLIC_URL (dev default here)", () => {
    const built = readFileSync(resolve(__dirname, "../dist/manifest.xml"), "utf8");
    expect(built).toContain("https://localhost:3000/taskpane.html");
  });
});
