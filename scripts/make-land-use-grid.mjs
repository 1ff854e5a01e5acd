// Writes a land-use layer for measuring: a grid of square blocks (GeoJSON Polygons with population and jobs)
// over the bounding box of a feed's stops, about --blocks of them (default 40 000, a large city's census
// blocks). The counts come from a seeded PRNG, so the same feed gives the same bytes. It stands for no real
// place: the blocks cover the box evenly, water and parks included.
//
// Usage: node scripts/make-land-use-grid.mjs FEED.zip OUT.geojson [--blocks N]

import { writeFileSync } from 'node:fs';
import yauzl from 'yauzl';
import { parse } from 'csv-parse/sync';
import { prng } from './lib/seeded.mjs';

function readEntry(zipPath, name) {
  return new Promise((resolve, reject) => {
    yauzl.open(zipPath, { lazyEntries: true }, (err, zip) => {
      if (err) return reject(err);
      zip.on('entry', (e) => {
        if (e.fileName !== name) return zip.readEntry();
        zip.openReadStream(e, (err2, stream) => {
          if (err2) return reject(err2);
          const parts = [];
          stream.on('data', (d) => parts.push(d));
          stream.on('end', () => {
            zip.close();
            resolve(Buffer.concat(parts).toString('utf8'));
          });
        });
      });
      zip.on('end', () => reject(new Error(`${name} not in ${zipPath}`)));
      zip.readEntry();
    });
  });
}

const [feedPath, outPath] = process.argv.slice(2).filter((a, i, all) => !a.startsWith('--') && all[i - 1] !== '--blocks');
const bi = process.argv.indexOf('--blocks');
const blocks = bi >= 0 ? Number(process.argv[bi + 1]) : 40_000;
if (!feedPath || !outPath || !(blocks > 0)) {
  console.error('usage: node scripts/make-land-use-grid.mjs FEED.zip OUT.geojson [--blocks N]');
  process.exit(2);
}
const stops = parse(await readEntry(feedPath, 'stops.txt'), { columns: true, bom: true, skip_empty_lines: true });
let minLat = Infinity;
let maxLat = -Infinity;
let minLon = Infinity;
let maxLon = -Infinity;
for (const s of stops) {
  const lat = Number(s.stop_lat);
  const lon = Number(s.stop_lon);
  if (!Number.isFinite(lat) || !Number.isFinite(lon) || (lat === 0 && lon === 0)) continue;
  minLat = Math.min(minLat, lat);
  maxLat = Math.max(maxLat, lat);
  minLon = Math.min(minLon, lon);
  maxLon = Math.max(maxLon, lon);
}
// square-ish cells: as many columns over rows as the box is wide over tall, in metres
const kx = Math.cos((((minLat + maxLat) / 2) * Math.PI) / 180);
const aspect = ((maxLon - minLon) * kx) / (maxLat - minLat);
const ny = Math.max(1, Math.round(Math.sqrt(blocks / aspect)));
const nx = Math.max(1, Math.round(blocks / ny));
const dLat = (maxLat - minLat) / ny;
const dLon = (maxLon - minLon) / nx;
const rand = prng(20261102);
const r6 = (v) => Math.round(v * 1e6) / 1e6;
const lines = [];
for (let j = 0; j < ny; j++) {
  for (let i = 0; i < nx; i++) {
    const lat = minLat + j * dLat;
    const lon = minLon + i * dLon;
    // the block leaves a street's width of its cell empty on two sides
    const ring = [
      [lon, lat],
      [lon + dLon * 0.85, lat],
      [lon + dLon * 0.85, lat + dLat * 0.85],
      [lon, lat + dLat * 0.85],
      [lon, lat],
    ].map(([x, y]) => [r6(x), r6(y)]);
    const population = Math.round(rand() * 120);
    const jobs = Math.round(rand() * rand() * 300);
    lines.push(JSON.stringify({ type: 'Feature', properties: { population, jobs }, geometry: { type: 'Polygon', coordinates: [ring] } }));
  }
}
writeFileSync(outPath, `{"type":"FeatureCollection","features":[\n${lines.join(',\n')}\n]}\n`);
console.error(
  `${lines.length} blocks of about ${Math.round(dLat * 0.85 * 111_000)} m over ${minLat.toFixed(4)},${minLon.toFixed(4)} - ${maxLat.toFixed(4)},${maxLon.toFixed(4)} written to ${outPath}`,
);
