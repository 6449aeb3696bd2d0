// The command table: adding a command is one line here plus its module in this folder.
// Modules load lazily so `graph-curator validate` does not pay for the training code.
import type { CommandModule } from '../command';

export const COMMANDS: Record<string, () => Promise<CommandModule>> = {
  init: () => import('./init'),
  validate: () => import('./validate'),
  summary: () => import('./summary'),
  apply: () => import('./apply'),
  score: () => import('./score'),
  evaluate: () => import('./evaluate'),
  report: () => import('./report'),
  doubts: () => import('./doubts'),
  suggest: () => import('./suggest'),
  discover: () => import('./discover'),
  help: () => import('./help'),
};
