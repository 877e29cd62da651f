import type { Command } from 'commander';
import { registerRenderCommand } from './render.js';
import { registerDemoCommand } from './demo.js';
import { registerPartsCommand } from './parts.js';

/** Every command file exports `register<Name>Command(program)`; they are wired up here in menu order. */
export function registerCommands(program: Command): void {
  registerRenderCommand(program);
  registerDemoCommand(program);
  registerPartsCommand(program);
}
