// A grid of points on the map (stops, land-use points) for finding those within a short distance of a place
// without looking at all of them: cells of CELL_DEG degrees, a query visits the cells a circle of the reach
// overlaps and measures each point found there on the sphere (haversineM).

import { haversineM } from '../network/geodesy.js';

const CELL_DEG = 0.002; // about 220 m north-south
const M_PER_DEG_LAT = 111_000; // a little under the metres per degree anywhere, so the cells visited hold every point inside the reach
const ROW = 200_003; // cells per row of the key: more than 360 / CELL_DEG

export class PointGrid {
  private readonly cells = new Map<number, number[]>();
  constructor(
    private readonly lat: ArrayLike<number>,
    private readonly lon: ArrayLike<number>,
    ids?: Iterable<number>,
  ) {
    const add = (i: number): void => {
      const la = lat[i];
      const lo = lon[i];
      if (!Number.isFinite(la) || !Number.isFinite(lo)) return;
      const key = Math.floor(la / CELL_DEG) * ROW + Math.floor(lo / CELL_DEG);
      let c = this.cells.get(key);
      if (!c) this.cells.set(key, (c = []));
      c.push(i);
    };
    if (ids) for (const i of ids) add(i);
    else for (let i = 0; i < lat.length; i++) add(i);
  }

  /** Calls visit(i, metres) for every point within reachM (straight line on the sphere) of lat, lon. */
  near(lat: number, lon: number, reachM: number, visit: (i: number, dM: number) => void): void {
    const dLat = reachM / M_PER_DEG_LAT;
    const dLon = reachM / (M_PER_DEG_LAT * Math.max(0.01, Math.cos(Math.min(89.9, Math.abs(lat) + dLat) * (Math.PI / 180))));
    const i0 = Math.floor((lat - dLat) / CELL_DEG);
    const i1 = Math.floor((lat + dLat) / CELL_DEG);
    const j0 = Math.floor((lon - dLon) / CELL_DEG);
    const j1 = Math.floor((lon + dLon) / CELL_DEG);
    for (let i = i0; i <= i1; i++) {
      for (let j = j0; j <= j1; j++) {
        const c = this.cells.get(i * ROW + j);
        if (!c) continue;
        for (const s of c) {
          const d = haversineM(lat, lon, this.lat[s], this.lon[s]);
          if (d <= reachM) visit(s, d);
        }
      }
    }
  }
}
