/**
 * The report's style sheet: the page, the figures (wide or narrow picture
 * by window width), tables, contents and status badges, the report's own
 * views, print, and the vendored chart library's CSS.
 *
 * @module
 */
import { vendorFile } from "./scripts.ts";

/** The page's own styles. */
const STYLE = `
body { font-family: Helvetica, Arial, sans-serif; color: #22313f; margin: 0; background: #f4f1ea; }
header { background: #22313f; color: #f4f1ea; padding: 18px 32px; }
header h1 { margin: 0 0 4px 0; font-size: 22px; }
header p { margin: 2px 0; font-size: 13px; color: #cfd8e0; }
main { padding: 8px 32px 32px 32px; max-width: 1500px; }
h2 { border-bottom: 2px solid #c8553d; padding-bottom: 4px; margin-top: 32px; font-size: 18px; }
h3 { font-size: 15px; margin-bottom: 4px; }
figure { margin: 12px 0; background: #ffffff; border: 1px solid #d9d4c7; padding: 6px; display: block; }
figure svg { width: 100%; max-width: 1400px; height: auto; display: block; }
figure.live > .static { display: none; }
figure.small { display: inline-block; vertical-align: top; width: calc(50% - 20px); min-width: 320px; margin-right: 8px; }
.chart-tools { font-size: 12px; margin: 0 0 4px 0; display: flex; flex-wrap: wrap; gap: 6px; align-items: center; }
.chart-tools button { font: inherit; background: #f4f1ea; border: 1px solid #b9b2a2; border-radius: 3px; padding: 2px 8px; cursor: pointer; }
.chart-hint { color: #6b7785; }
.map-readout { font-size: 12px; color: #22313f; padding: 4px 2px; min-height: 1.4em; }
figure .uplot { font-family: Helvetica, Arial, sans-serif; }
figure .u-title { font-size: 14px; font-weight: 600; }
figure .u-legend { font-size: 12px; text-align: left; }
table { border-collapse: collapse; margin: 8px 0 16px 0; font-size: 13px; background: #ffffff; }
th, td { border: 1px solid #d9d4c7; padding: 4px 8px; text-align: left; }
th { background: #e8e2d4; }
tr.pass td.verdict { color: #1f6f3f; font-weight: 700; }
tr.fail td.verdict { color: #b02e1f; font-weight: 700; }
tr.unchecked td { color: #6b7785; }
.note { font-size: 12px; color: #5b6b7b; }
td .failing { font-size: 12px; color: #b02e1f; margin-top: 2px; }
.caveat { border-left: 4px solid #edae49; background: #fff8e6; padding: 8px 12px; font-size: 13px; }
figure .u-legend th, figure .u-legend td { border: none; background: none; padding: 1px 4px; font-weight: 400; }
figure .u-legend .u-value { color: #3d4b59; }
figure.live.legend-beside .uplot { display: grid; grid-template-columns: max-content minmax(0, 1fr); align-items: start; width: auto; }
figure.live.legend-beside .u-title { grid-column: 1 / -1; }
figure.live.legend-beside .u-legend { margin: 8px 0 0 12px; text-align: left; }
figure.live.legend-beside .u-legend.u-inline tr { display: block; margin: 0 0 4px 0; }
.narrow-picture { display: none; }
.contents { background: #ffffff; border: 1px solid #d9d4c7; padding: 6px 16px 10px 16px; margin: 16px 0; }
.contents h2 { border: none; margin: 6px 0 2px 0; }
.contents ol { columns: 2 340px; column-gap: 32px; padding-left: 24px; margin: 6px 0 0 0; font-size: 13px; }
.contents li { break-inside: avoid; margin: 3px 0; }
.contents a { color: #1d4e89; }
.contents-tools { display: inline-flex; gap: 6px; margin-left: 8px; }
.contents-tools button { font: inherit; font-size: 12px; background: #f4f1ea; border: 1px solid #b9b2a2; border-radius: 3px; padding: 1px 8px; cursor: pointer; }
.status { display: inline-block; font-size: 12px; font-weight: 700; line-height: 1.3; padding: 0 6px; border: 1px solid; border-radius: 3px; white-space: nowrap; }
.status-ok { color: #1f6f3f; background: #e8f3ec; border-color: #9cc5aa; }
.status-warnings { color: #6e4a00; background: #fff4d6; border-color: #d9a93e; }
.status-failed, .status-target-failed { color: #ffffff; background: #b02e1f; border-color: #6f1a10; }
details.section > summary { list-style: none; cursor: pointer; display: flex; flex-wrap: wrap; align-items: baseline; gap: 4px 10px; border-bottom: 2px solid #c8553d; margin-top: 28px; padding-bottom: 4px; }
details.section > summary::-webkit-details-marker { display: none; }
details.section > summary::before { content: "\\25BE"; font-size: 14px; width: 14px; color: #c8553d; }
details.section:not([open]) > summary::before { content: "\\25B8"; }
details.section > summary h2 { display: inline; border: none; margin: 0; padding: 0; }
details.section > summary:focus-visible { outline: 2px solid #1d4e89; outline-offset: 2px; }
.to-contents { position: fixed; right: 14px; bottom: 14px; z-index: 10; background: #22313f; color: #f4f1ea; padding: 6px 14px; border-radius: 16px; font-size: 13px; text-decoration: none; box-shadow: 0 1px 4px rgba(0, 0, 0, 0.3); }
.to-contents:focus-visible { outline: 2px solid #edae49; }
@media print { body { background: #ffffff; } header { background: #ffffff; color: #000000; } figure { break-inside: avoid; } figure.live > .static { display: block; } .interactive, .chart-tools, .map-readout, .to-contents, .contents-tools { display: none; } }
@media (max-width: 1340px) { figure.small { display: block; width: auto; min-width: 0; margin-right: 0; } }
@media (max-width: 1039px) { .wide-picture { display: none; } .narrow-picture { display: block; } .narrow-picture svg { max-width: 760px; } }
@media (max-width: 760px) { main { padding: 8px 10px 24px 10px; } header { padding: 12px 10px; } table { font-size: 11px; } .contents { padding: 4px 10px 8px 10px; } .contents ol { padding-left: 20px; } }
`;

/**
 * The CSS of the report's own views: a live time history hides its static
 * picture on screen (print shows it), and a mode shape keeps its size.
 */
export const VIEWS_STYLE = `
figure.view-live > .static { display: none; }
.history-title { font-size: 13px; font-weight: 600; margin: 2px 0 0 4px; }
.history .u-title { font-size: 12px; text-align: right; padding-right: 18px; height: 18px; line-height: 18px; }
.shape-view svg { max-height: 600px; }
.history-static svg { max-width: 960px; }
@media print { figure.view-live > .static { display: block; } }
`;

/** The whole style sheet of the report, as inlined in its `<style>` element. */
export function reportStyle(): string {
  return `${STYLE}${VIEWS_STYLE}${vendorFile("uPlot.min.css")}`;
}
