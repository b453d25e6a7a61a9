// Every command of the command line, in the order `--help` lists them.
import type { Command } from 'commander';
import { registerPlan } from './plan.js';
import { registerSchema } from './schema.js';
import { registerSolve } from './solve.js';
import { registerVerify } from './verify.js';
import { registerRun } from './run.js';
import { registerSubmit } from './submit.js';
import { registerWorker } from './worker.js';
import { registerCollect } from './collect.js';
import { registerStatus } from './status.js';
import { registerReport } from './report.js';

export function registerCommands(program: Command): void {
  registerPlan(program);
  registerSchema(program);
  registerSolve(program);
  registerVerify(program);
  registerRun(program);
  registerSubmit(program);
  registerWorker(program);
  registerCollect(program);
  registerStatus(program);
  registerReport(program);
}
