// Single-option overrides of model parameters, shared by audit and whatif. Each maps to a key of the
// parameters file (DESIGN.md section 4); the model validates the values.

import { parseDecimal } from '../common/decimal.js';
import type { Command } from 'commander';

const OPTIONS: { flag: string; key: string; help: string; numeric: boolean }[] = [
  { flag: '--walk-speed <m/s>', key: 'walk_speed_mps', help: 'walking speed, m/s', numeric: true },
  { flag: '--walk-weight <w>', key: 'walk_weight', help: 'weight of walk time relative to riding time', numeric: true },
  { flag: '--door-time <s>', key: 'door_time_s', help: 'fixed time lost per stop served (doors and first movements), s', numeric: true },
  { flag: '--cruise-speed <m/s>', key: 'cruise_speed_mps', help: 'bus cruise speed, m/s (default: estimated per pattern)', numeric: true },
  { flag: '--band-tolerance <e>', key: 'band_tolerance', help: 'cost tolerance of the near-optimal band (0.05 = 5 %)', numeric: true },
  { flag: '--max-gap <m>', key: 'max_gap_m', help: 'largest gap between stops the walking policy allows, m', numeric: true },
  {
    flag: '--stopping-model <name>',
    key: 'stopping_model',
    help: 'auto (default: observed, else poisson with a ridership file, else always), always, poisson or observed',
    numeric: false,
  },
];

export function addParamOptions(cmd: Command): void {
  for (const o of OPTIONS) cmd.option(o.flag, o.help);
}

/** The parameter keys set by single options; numbers are passed as numbers when they parse, else as text for the model to reject. */
export function paramOverrides(opts: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const o of OPTIONS) {
    const attr = o.flag
      .replace(/^--/, '')
      .replace(/ .*$/, '')
      .replace(/-([a-z])/g, (_, c: string) => c.toUpperCase());
    const v = opts[attr];
    if (v === undefined) continue;
    out[o.key] = o.numeric && typeof v === 'string' ? (parseDecimal(v) ?? v) : v;
  }
  return out;
}
