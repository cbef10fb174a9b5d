/* A small Markdown-to-HTML renderer for the help page (headings with anchors, paragraphs,
 * lists, fenced code, tables as preformatted text). Everything is HTML-escaped. */
function esc(s) {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}
function inline(s) {
  return esc(s)
    .replace(/`([^`]+)`/g, "<code>$1</code>")
    .replace(/\*\*([^*]+)\*\*/g, "<strong>$1</strong>")
    .replace(/\[([^\]]+)\]\((#[^)]+|https:[^)]+)\)/g, '<a href="$2">$1</a>');
}
function slug(s) {
  return s
    .toLowerCase()
    .replace(/[^a-z0-9 -]/g, "")
    .trim()
    .replace(/ +/g, "-");
}
function renderMarkdown(md, title) {
  const lines = md.split("\n");
  const out = [];
  let i = 0;
  while (i < lines.length) {
    const l = lines[i];
    if (l.startsWith("```")) {
      const buf = [];
      i++;
      while (i < lines.length && !lines[i].startsWith("```")) buf.push(lines[i++]);
      i++;
      out.push(`<pre><code>${esc(buf.join("\n"))}</code></pre>`);
      continue;
    }
    const h = /^(#{1,4}) (.*)$/.exec(l);
    if (h) {
      out.push(`<h${h[1].length} id="${slug(h[2])}">${inline(h[2])}</h${h[1].length}>`);
      i++;
      continue;
    }
    if (l.startsWith("|")) {
      const buf = [];
      while (i < lines.length && lines[i].startsWith("|")) buf.push(lines[i++]);
      out.push(`<pre class="table">${esc(buf.filter((r) => !/^\|[-| :]+\|$/.test(r)).join("\n"))}</pre>`);
      continue;
    }
    if (/^\s*[-*] /.test(l)) {
      const buf = [];
      while (i < lines.length && /^\s*[-*] /.test(lines[i])) {
        let item = lines[i++].replace(/^\s*[-*] /, "");
        while (i < lines.length && /^\s{2,}\S/.test(lines[i]) && !/^\s*[-*] /.test(lines[i])) item += " " + lines[i++].trim();
        buf.push(`<li>${inline(item)}</li>`);
      }
      out.push(`<ul>${buf.join("")}</ul>`);
      continue;
    }
    if (l.trim() === "") {
      i++;
      continue;
    }
    const buf = [];
    while (i < lines.length && lines[i].trim() !== "" && !/^(#|```|\||\s*[-*] )/.test(lines[i])) buf.push(lines[i++]);
    out.push(`<p>${inline(buf.join(" "))}</p>`);
  }
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta http-equiv="Content-Security-Policy" content="default-src 'self'; style-src 'self'"><title>${esc(title)}</title><link rel="stylesheet" href="taskpane.css"></head><body class="help">${out.join("\n")}</body></html>`;
}
module.exports = { renderMarkdown, slug };
