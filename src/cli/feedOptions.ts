// The download options of every command that reads a feed (audit, check, compare, whatif), registered in
// one place: --header NAME:VALUE (repeatable, sent with the feed's download to its own host) and
// --no-cache (fetch the feed whole, without the download cache). Proxies come from the environment.

import type { Command } from 'commander';
import type { FetchOptions } from '../gtfs/download.js';
import { parseHeaderOptions } from '../gtfs/requestHeaders.js';
import { repeatedOption } from './shared.js';

export interface FeedFetchCliOptions {
  header?: string[];
  cache?: boolean;
}

export function addFeedOptions(cmd: Command): void {
  cmd
    .option(
      '--header <NAME:VALUE>',
      'a request header sent when the feed is downloaded from a URL, e.g. an API key (repeatable; only to that host)',
      repeatedOption,
    )
    .option('--no-cache', 'download the feed whole, without using or filling the download cache');
}

/** The library's download options from the command's; a malformed --header is a bad-option error. */
export function feedFetchOptions(opts: FeedFetchCliOptions): FetchOptions {
  return { headers: parseHeaderOptions(opts.header ?? []), cache: opts.cache !== false };
}
