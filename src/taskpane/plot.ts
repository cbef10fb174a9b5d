/**
 * Small SVG plots for the pane, drawn with the DOM (no charting library: the pane's security
 * policy allows no inline styles or scripts, and these few shapes stay crisp at every width).
 * Every plot has axes with ticks and numbers, a caption outside the drawing (so no point can sit
 * on it), points that name their row on hover and on keyboard focus, and an accessible summary.
 */
const SVG = "http://www.w3.org/2000/svg";

export interface Frame {
  readonly svg: SVGSVGElement;
  /** Data → pixel. */
  sx(v: number): number;
  sy(v: number): number;
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
}

/** Create an SVG element with attributes. */
export function svgEl<K extends keyof SVGElementTagNameMap>(tag: K, attrs: Record<string, string | number> = {}, cls?: string): SVGElementTagNameMap[K] {
  const e = document.createElementNS(SVG, tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
  if (cls) e.setAttribute("class", cls);
  return e;
}

/** About `count` round tick values covering [lo, hi] (1, 2 or 5 times a power of ten apart). */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) {
    const d = Math.abs(lo) > 0 ? Math.abs(lo) * 0.1 : 1;
    lo -= d;
    hi += d;
  }
  const raw = (hi - lo) / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** A tick label: short, no trailing zeros, exponent form for very large or small values. */
export function tickText(v: number): string {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(1).replace(/\.0e/, "e");
  return String(Number(v.toPrecision(4)));
}

/** Axes, grid lines, tick numbers and axis titles for the data ranges; returns the frame. */
export function frame(xr: [number, number], yr: [number, number], xTitle: string, yTitle: string, label: string): Frame {
  const W = 480;
  const H = 300;
  const left = 56;
  const right = W - 12;
  const top = 10;
  const bottom = H - 40;
  const xt = niceTicks(xr[0], xr[1]);
  const yt = niceTicks(yr[0], yr[1]);
  const x0 = Math.min(xr[0], xt[0]!);
  const x1 = Math.max(xr[1], xt[xt.length - 1]!);
  const y0 = Math.min(yr[0], yt[0]!);
  const y1 = Math.max(yr[1], yt[yt.length - 1]!);
  const sx = (v: number): number => left + ((v - x0) / (x1 - x0 || 1)) * (right - left);
  const sy = (v: number): number => bottom - ((v - y0) / (y1 - y0 || 1)) * (bottom - top);
  const svg = svgEl("svg", { viewBox: `0 0 ${W} ${H}`, role: "group", "aria-label": label }, "plot-svg");
  const axes = svgEl("g", {}, "axes");
  for (const v of xt) {
    const x = sx(v).toFixed(1);
    axes.appendChild(svgEl("line", { x1: x, x2: x, y1: top, y2: bottom }, "grid"));
    const t = svgEl("text", { x, y: bottom + 14, "text-anchor": "middle" }, "tick");
    t.textContent = tickText(v);
    axes.appendChild(t);
  }
  for (const v of yt) {
    const y = sy(v).toFixed(1);
    axes.appendChild(svgEl("line", { x1: left, x2: right, y1: y, y2: y }, "grid"));
    const t = svgEl("text", { x: left - 5, y: Number(y) + 3, "text-anchor": "end" }, "tick");
    t.textContent = tickText(v);
    axes.appendChild(t);
  }
  axes.appendChild(svgEl("rect", { x: left, y: top, width: right - left, height: bottom - top }, "box"));
  const xl = svgEl("text", { x: (left + right) / 2, y: H - 6, "text-anchor": "middle" }, "axis-title");
  xl.textContent = xTitle;
  const yl = svgEl("text", { x: 12, y: (top + bottom) / 2, "text-anchor": "middle", transform: `rotate(-90 12 ${(top + bottom) / 2})` }, "axis-title");
  yl.textContent = yTitle;
  axes.append(xl, yl);
  svg.appendChild(axes);
  return { svg, sx, sy, left, right, top, bottom };
}

export interface PlotPoint {
  readonly x: number;
  readonly y: number;
  /** Worksheet or data row number, shown to the user. */
  readonly row: number;
  /** Index of the input row (0-based), passed back on pick. */
  readonly index: number;
  /** What hovering or focusing the point says. */
  readonly label: string;
}

/** Points that are individually focusable, at most (beyond, they are drawn but reached through the table). */
const FOCUSABLE = 300;
/** Beyond this many points the plot shows their density on a grid instead of single marks. */
const DENSITY_FROM = 4000;

/**
 * Draw points: circles (translucent when many), or for very many points a density grid.
 * Hover or focus names the row in `status`; a click or Enter calls `pick` with the input row.
 */
export function drawPoints(f: Frame, pts: readonly PlotPoint[], status: HTMLElement, pick?: (index: number) => void): void {
  const g = svgEl("g", {}, "points");
  if (pts.length > DENSITY_FROM) {
    const nx = 60;
    const ny = 40;
    const counts = new Uint32Array(nx * ny);
    const w = (f.right - f.left) / nx;
    const h = (f.bottom - f.top) / ny;
    for (const p of pts) {
      const i = Math.min(nx - 1, Math.max(0, Math.floor((f.sx(p.x) - f.left) / w)));
      const j = Math.min(ny - 1, Math.max(0, Math.floor((f.sy(p.y) - f.top) / h)));
      counts[j * nx + i]!++;
    }
    const max = Math.max(...counts);
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++) {
        const c = counts[j * nx + i]!;
        if (c === 0) continue;
        const level = Math.min(5, Math.ceil((5 * Math.log1p(c)) / Math.log1p(max)));
        g.appendChild(svgEl("rect", { x: (f.left + i * w).toFixed(1), y: (f.top + j * h).toFixed(1), width: w.toFixed(1), height: h.toFixed(1) }, `density d${level}`));
      }
    f.svg.appendChild(g);
    status.textContent = `${pts.length} points, shown as density (darker cells hold more points).`;
    return;
  }
  const many = pts.length > 400;
  pts.forEach((p, k) => {
    const c = svgEl("circle", { cx: f.sx(p.x).toFixed(1), cy: f.sy(p.y).toFixed(1), r: many ? 2 : 3.5 }, many ? "pt many" : "pt");
    const t = svgEl("title");
    t.textContent = p.label;
    c.appendChild(t);
    if (k < FOCUSABLE) {
      c.setAttribute("tabindex", "0");
      c.setAttribute("role", "img");
      c.setAttribute("aria-label", p.label);
    }
    const say = (): void => {
      status.textContent = p.label;
    };
    c.addEventListener("mouseenter", say);
    c.addEventListener("focus", say);
    if (pick) {
      c.classList.add("pickable");
      c.addEventListener("click", () => pick(p.index));
      c.addEventListener("keydown", (ev) => {
        if ((ev as KeyboardEvent).key === "Enter") pick(p.index);
      });
    }
    g.appendChild(c);
  });
  f.svg.appendChild(g);
}

/** A polyline through (x, y) pairs (NaN breaks it). */
export function drawLine(f: Frame, xs: readonly number[], ys: readonly number[], cls: string): void {
  let d = "";
  let pen = false;
  xs.forEach((x, i) => {
    const y = ys[i]!;
    if (!Number.isFinite(y)) {
      pen = false;
      return;
    }
    d += `${pen ? "L" : "M"}${f.sx(x).toFixed(1)} ${f.sy(y).toFixed(1)}`;
    pen = true;
  });
  if (d) f.svg.appendChild(svgEl("path", { d }, cls));
}

/** A band between lower and upper curves over xs (points where either is not finite are left out). */
export function drawBand(f: Frame, xs: readonly number[], lo: readonly number[], hi: readonly number[], cls: string): void {
  const idx = xs.map((_, i) => i).filter((i) => Number.isFinite(lo[i]!) && Number.isFinite(hi[i]!));
  if (idx.length < 2) return;
  const up = idx.map((i) => `${f.sx(xs[i]!).toFixed(1)} ${f.sy(hi[i]!).toFixed(1)}`);
  const down = idx
    .slice()
    .reverse()
    .map((i) => `${f.sx(xs[i]!).toFixed(1)} ${f.sy(lo[i]!).toFixed(1)}`);
  f.svg.appendChild(svgEl("path", { d: `M${up.join("L")}L${down.join("L")}Z` }, cls));
}

/** A figure: the SVG, a caption under it, and a status line that names the focused point. */
export function figure(title: string, caption: string, kind: string): { box: HTMLElement; status: HTMLElement; put(svg: SVGSVGElement): void } {
  const box = document.createElement("figure");
  box.className = `plot ${kind}`;
  const h = document.createElement("h3");
  h.textContent = title;
  const cap = document.createElement("figcaption");
  cap.textContent = caption;
  const status = document.createElement("p");
  status.className = "plot-status";
  status.setAttribute("aria-live", "polite");
  box.append(h);
  return {
    box,
    status,
    put(svg: SVGSVGElement) {
      box.append(svg, status, cap);
    },
  };
}
