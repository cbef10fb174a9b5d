/* The help page (help.html, the target of every function's help link): the user sections of the
 * README rendered with markdown-it (tables, lists, code, headings), raw HTML off, each heading with
 * an id ("### LSQ.COEF" → #lsqcoef, "## Missing data" → #missing-data). Sections meant for
 * contributors or for setting the project up are left out (HELP_SKIP). */
const MarkdownIt = require("markdown-it");

/** README sections (## headings) that are not for users of the functions. */
const HELP_SKIP = ["Set up on a fresh machine", "What exists so far", "Performance", "Tests", "For contributors"];

function slug(s) {
  return s
    .toLowerCase()
    .replace(/[^a-z0-9 -]/g, "")
    .trim()
    .replace(/ +/g, "-");
}

/** The README without the sections in HELP_SKIP (a section runs to the next ## heading). */
function userSections(md) {
  const out = [];
  let skip = false;
  for (const line of md.split("\n")) {
    const h = /^## (.+)$/.exec(line);
    if (h) skip = HELP_SKIP.includes(h[1].trim());
    if (!skip) out.push(line);
  }
  return out.join("\n");
}

function renderMarkdown(md, title) {
  const mdi = new MarkdownIt({ html: false, linkify: false, typographer: false });
  const seen = new Map();
  mdi.core.ruler.push("heading_ids", (state) => {
    const toks = state.tokens;
    for (let i = 0; i < toks.length; i++) {
      if (toks[i].type !== "heading_open") continue;
      let id = slug(toks[i + 1].content);
      const n = seen.get(id) ?? 0;
      seen.set(id, n + 1);
      if (n > 0) id = `${id}-${n}`;
      toks[i].attrSet("id", id);
    }
  });
  // links: only in-page anchors and https addresses stay links
  const defaultLink = mdi.renderer.rules.link_open || ((t, i, o, e, self) => self.renderToken(t, i, o));
  mdi.renderer.rules.link_open = (tokens, idx, options, env, self) => {
    const href = tokens[idx].attrGet("href") || "";
    if (!/^(#|https:)/.test(href)) tokens[idx].attrSet("href", `#${slug(href.replace(/\.md$/, ""))}`);
    return defaultLink(tokens, idx, options, env, self);
  };
  const body = mdi.render(userSections(md));
  const esc = (s) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;");
  return `<!doctype html>
<html lang="en-US"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'self'; img-src 'self'">
<title>${esc(title)}</title><link rel="stylesheet" href="taskpane.css"></head>
<body class="help">
${body}
</body></html>
`;
}

module.exports = { renderMarkdown, userSections, slug };
