import type { Command } from 'commander';
import { registerRenderCommand } from './render.js';
import { registerCompareCommand } from './compare.js';
import { registerDemoCommand } from './demo.js';
import { registerMeasureCommand } from './measure.js';
import { registerAnalyzeCommand } from './analyze.js';
import { registerCheckCommand } from './check.js';
import { registerPartsCommand } from './parts.js';
import { registerSpreadCommand } from './spread.js';
import { registerFitCommand } from './fit.js';

/** Every command file exports `register<Name>Command(program)`; they are wired up here in menu order. */
export function registerCommands(program: Command): void {
  registerRenderCommand(program);
  registerCompareCommand(program);
  registerDemoCommand(program);
  registerMeasureCommand(program);
  registerAnalyzeCommand(program);
  registerCheckCommand(program);
  registerSpreadCommand(program);
  registerFitCommand(program);
  registerPartsCommand(program);
}
