/** The HTML pack's stylesheet, screen and print. */
export const PACK_CSS = `
:root{color-scheme:light}
body{margin:0;background:#f6f6f4;color:#1f1f1f;font:15px/1.5 "IBM Plex Sans",sans-serif}
main{max-width:820px;margin:0 auto;padding:32px 40px 64px;background:#fff}
h1{font-size:28px;line-height:1.2;margin:0 0 8px;font-weight:600}
h2{font-size:21px;margin:48px 0 12px;padding-top:12px;border-top:2px solid #1f1f1f;font-weight:600}
h3{font-size:16px;margin:24px 0 8px;font-weight:600}
a{color:#0060a0}
table{border-collapse:collapse;width:100%;margin:8px 0 16px;font-size:13px;font-variant-numeric:tabular-nums}
th,td{border-bottom:1px solid #ddd;padding:4px 6px;vertical-align:top;text-align:left}
th{border-bottom:1.5px solid #1f1f1f;font-weight:600}
td[align=right],th[align=right]{text-align:right}
pre{background:#f3f3f0;border:1px solid #e0e0dc;padding:8px 10px;overflow-x:auto;font-size:12.5px}
code{font-family:ui-monospace,"DejaVu Sans Mono",monospace}
figure.chart{margin:12px 0}
svg.chart{width:100%;height:auto;display:block}
@media print{
  @page{size:A4;margin:16mm 14mm}
  body{background:#fff;font-size:10.5pt}
  main{max-width:none;padding:0}
  h2{break-before:page;border-top:none;margin-top:0}
  h1+p+p+h2{break-before:auto}
  figure.chart,tr,pre{break-inside:avoid}
  thead{display:table-header-group}
  a{color:inherit;text-decoration:none}
}
`;
