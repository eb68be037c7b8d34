// The report's one stylesheet: the reader's light or dark preference, and a print layout that keeps each chart on
// one page. Class colours are not here; they come from the palette and read on both backgrounds.
export const STYLE = `
:root { color-scheme: light dark; --bg: #ffffff; --fg: #1f1f1f; --muted: #5c5c5c; --rule: #d4d4d4; --grid: #ebebeb;
  --accent: #2a5db0; --card: #f7f7f7; --warn: #8a5a00; }
@media (prefers-color-scheme: dark) {
  :root { --bg: #1e1e1e; --fg: #e0e0e0; --muted: #a8a8a8; --rule: #4a4a4a; --grid: #333333; --accent: #7aa7f0; --card: #262626; --warn: #e0b050; }
}
* { box-sizing: border-box; }
body { margin: 0; background: var(--bg); color: var(--fg); font: 14px/1.45 system-ui, "Segoe UI", "DejaVu Sans", sans-serif; }
main { max-width: 1040px; margin: 0 auto; padding: 24px 28px 40px; }
h1 { font-size: 22px; margin: 0 0 4px; }
h2 { font-size: 17px; margin: 0 0 10px; }
h3 { font-size: 14px; margin: 14px 0 6px; }
p { margin: 6px 0; }
section { background: var(--card); border: 1px solid var(--rule); border-radius: 6px; padding: 14px 18px; margin: 14px 0; }
.muted, .date { color: var(--muted); }
.caution { border-left: 4px solid var(--warn); padding: 8px 12px; margin: 12px 0; background: var(--card); }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; margin: 0; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
code, .mono { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 12.5px; overflow-wrap: anywhere; }
table { border-collapse: collapse; margin: 6px 0; }
th, td { padding: 3px 10px; border-bottom: 1px solid var(--rule); text-align: left; vertical-align: top; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
.headline { font-weight: 700; font-size: 16px; }
ul.plain { margin: 4px 0; padding-left: 20px; }
.figures { display: flex; flex-wrap: wrap; gap: 18px; align-items: flex-start; }
figure { margin: 0; break-inside: avoid; }
figcaption { font-weight: 600; margin-bottom: 4px; max-width: 440px; }
svg text { fill: var(--fg); font-size: 11px; font-family: inherit; }
svg .tick, svg .muted { fill: var(--muted); font-size: 10px; }
svg .axis-title { font-size: 11.5px; font-weight: 600; }
svg .axis, svg .whisker { stroke: var(--muted); stroke-width: 1; fill: none; }
svg .grid { stroke: var(--grid); stroke-width: 1; }
svg .bar { fill: var(--accent); }
svg .series { fill: none; stroke-width: 2; }
svg .ref { fill: none; stroke: var(--muted); stroke-width: 1; stroke-dasharray: 4 3; }
svg .hist { fill: var(--accent); fill-opacity: 0.55; }
svg .dots circle { fill-opacity: 0.55; }
#evaluation figure { width: min-content; }
#evaluation .legend li { white-space: nowrap; }
.per-class { display: inline-block; white-space: nowrap; margin-left: 6px; }
svg .frame { fill: none; stroke: var(--rule); }
svg .cells { image-rendering: pixelated; image-rendering: crisp-edges; }
svg .points circle { stroke: var(--bg); stroke-width: 0.8; }
.legend { list-style: none; padding: 0; margin: 6px 0; display: flex; flex-wrap: wrap; gap: 4px 14px; }
.swatch { display: inline-block; width: 12px; height: 12px; border-radius: 2px; margin-right: 5px; vertical-align: -1px; }
.ramp { width: 160px; height: 12px; image-rendering: auto; vertical-align: middle; margin: 0 6px; }
.small-maps { display: flex; flex-wrap: wrap; gap: 12px; }
.small-maps figcaption { font-weight: 400; font-size: 12px; max-width: 200px; }
footer { color: var(--muted); margin-top: 20px; font-size: 12px; }
@media print {
  :root { --bg: #ffffff; --fg: #000000; --muted: #444444; --rule: #bbbbbb; --grid: #e6e6e6; --accent: #2a5db0; --card: #ffffff; --warn: #8a5a00; color-scheme: light; }
  body { font-size: 11pt; }
  main { max-width: none; padding: 0; }
  section { border: none; border-top: 1px solid var(--rule); border-radius: 0; padding: 8px 0; break-inside: auto; }
  figure, table, .caution { break-inside: avoid; }
  h2 { break-after: avoid; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
`;
