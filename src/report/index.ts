// The reports: CSV, GeoJSON, summary.json and the HTML page as strings, and the atomic folder writer.
export * from './cautions.js';
export * from './csv.js';
export * from './geojson.js';
export * from './summaryJson.js';
export * from './units.js';
export { indexHtml, pageData, type HtmlOptions } from './html/indexHtml.js';
export { escapeHtml, jsonForScript } from '../common/escapeHtml.js';
export * from './writeReport.js';
export * from './writeFolder.js';
export * from './checkText.js';
export * from './compareRender.js';
export { historyText } from './historyText.js';
export { historyHtml, lineChartSvg, seriesOf, varies, yRange, type Series } from './historyHtml.js';
