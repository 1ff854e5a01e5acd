// `stopspan whatif FEED`: weigh a concrete proposal (remove, add or move stops) on the feed's patterns and
// print the figures as a table, or as JSON; --out also writes a page of the scenario and scenario.json.
// The scenario is checked whole before the feed is read, so nothing is computed from half of it.

import type { Command } from 'commander';
import { listOption, repeatedOption } from './shared.js';
import { addParamOptions } from './paramOptions.js';
import { addFeedOptions } from './feedOptions.js';
import type { WhatifOpts } from './whatifRun.js';

export function registerWhatif(program: Command): void {
  const cmd = program
    .command('whatif')
    .description('weigh a proposal (remove, add or move stops): walking, riding, run time, gaps, in passenger-minutes per day')
    .argument('<feed>', 'GTFS feed: a .zip file, a folder of .txt files, or an http(s) URL')
    .option('--remove <stops>', 'stops to remove, by stop_id or name (comma-separated; repeatable)', listOption)
    .option('--add <lat,lon[:route]>', 'a stop to add at these coordinates, optionally on one route only (repeatable)', repeatedOption)
    .option('--move <stop:lat,lon>', 'a stop to move to these coordinates (repeatable)', repeatedOption)
    .option(
      '--route <route>',
      'with --remove or --move by name: only the stop of that name on this route (route_id or short name; repeatable)',
      repeatedOption,
    )
    .option('--direction <0|1>', 'with --remove or --move by name: only the stop on this direction_id')
    .option('--headsign <text>', 'with --remove or --move by name: only the stop on patterns with this headsign')
    .option('--both-directions', 'with --remove or --move by name: every stop of that name (both sides of the street)')
    .option('--scenario <file.json>', 'a scenario file with remove, add and/or move lists (see README)')
    .option('--date <YYYY-MM-DD>', 'analysis date (default: the weekday in the feed with the most trips)')
    .option('--ridership <file.csv>', 'stop-level boardings and alightings per day')
    .option(
      '--land-use <file>',
      'where people live and work: CSV (lat, lon and counts) or GeoJSON points and polygons; coverage before and after and, without --ridership, demand follow it',
    )
    .option(
      '--land-use-weights <list>',
      'the land-use columns read and their weights, as column=weight,... (default population=1,jobs=1, whichever the file has)',
    )
    .option('--observed <archive>', 'GTFS-Realtime archive (zip or folder) for observed dwell, speed and stopping')
    .option(
      '--context <feed>',
      'another feed (zip, folder or URL; repeatable) whose stations within 150 m of a changed stop are named in the result',
      repeatedOption,
    )
    .option('--params <file.json>', 'model parameters (every key optional; see README)')
    .option('--json', 'print the result as one JSON document on stdout')
    .option('--out <dir>', 'also write index.html, result.json and scenario.json (a scenario --scenario reads back) into this folder')
    .option('--units <system>', 'units people read on the page: metric or imperial', 'metric')
    .option('--force', 'replace the output folder if it exists')
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors');
  addParamOptions(cmd);
  addFeedOptions(cmd);
  cmd.action(async (feedArg: string, opts: WhatifOpts) => {
    // the work loads only when the command runs, not at every start-up of the CLI
    const { runWhatif } = await import('./whatifRun.js');
    await runWhatif(feedArg, opts);
  });
}
