// The list of commands, each a module under src/cli that exports a register(program) function.

import type { Command } from 'commander';
import { registerAudit } from './audit.js';
import { registerCheck } from './check.js';
import { registerCompare } from './compare.js';
import { registerHistory } from './history.js';
import { registerWhatif } from './whatif.js';

export type RegisterCommand = (program: Command) => void;

export const commands: RegisterCommand[] = [registerAudit, registerCheck, registerCompare, registerHistory, registerWhatif];
