// The list of commands, each a module under src/cli that exports a register(program) function.

import type { Command } from 'commander';

export type RegisterCommand = (program: Command) => void;

export const commands: RegisterCommand[] = [];
