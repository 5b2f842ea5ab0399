/**
 * Runs commands by id. The Electron menu's `menu.command` events, the page's
 * keyboard shortcuts and the edit bar all come through `run`, so a failure is
 * reported the same way wherever the command was started.
 */
import { parseCommand, type CommandId } from '../../src-shared/commands';
import type { CommandHandlers } from './commandHandlers';

export class CommandRegistry {
  constructor(
    private readonly handlers: CommandHandlers,
    private readonly onError: (id: CommandId, err: unknown) => void,
  ) {}

  run(id: CommandId, index?: number): void {
    try {
      const out = this.handlers[id](index);
      if (out instanceof Promise) out.catch((err: unknown) => this.onError(id, err));
    } catch (err) {
      this.onError(id, err);
    }
  }

  /** A command string as the menu sends it (`file.openRecent.2`); false when it is not one of ours. */
  runWire(text: string): boolean {
    const c = parseCommand(text);
    if (!c) return false;
    this.run(c.id, c.index);
    return true;
  }
}
