// The CLI loads only the module of the command it runs (src/cli/commands/index.ts): each entry's
// name must be the command its module registers, or that command would be missing when run.
// A fact of this project's own code (no outside source needed).
import { describe, expect, it } from 'vitest';
import { commandModules } from '../src/cli/commands/index.js';
import { buildProgram } from '../src/cli/main.js';

describe('command modules', () => {
  it('each entry registers exactly the command it is named for', async () => {
    for (const { name } of commandModules) {
      const program = await buildProgram(name);
      expect(program.commands.map((c) => c.name())).toEqual([name]);
    }
  });

  it('without a name, every command is registered, in the listed order', async () => {
    const program = await buildProgram();
    expect(program.commands.map((c) => c.name())).toEqual(commandModules.map((c) => c.name));
    expect(commandModules.length).toBe(8);
  });
});
