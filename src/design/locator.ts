/**
 * Where a raw JSON value came from, for error messages: `design.json: stages[2].series`, or the
 * command-line override that set it (`--set clip.diode`).
 */

/** JSON path of a child: `stages` + 2 -> `stages[2]`, `stages[2]` + `rf` -> `stages[2].rf`. */
export function childPath(parent: string, key: string | number): string {
  if (typeof key === 'number') return `${parent}[${key}]`;
  return parent === '' ? key : `${parent}.${key}`;
}

export class Locator {
  /**
   * @param fileName the file the JSON was read from, as the user named it
   * @param overriddenPaths JSON path -> the override text that set it (e.g. `stages[2].diode` -> `--set clip.diode`)
   */
  constructor(
    readonly fileName: string,
    private readonly overriddenPaths: ReadonlyMap<string, string> = new Map(),
  ) {}

  /** Text that names `path` at the start of an error message. */
  at(path: string): string {
    for (const [overridden, option] of this.overriddenPaths) {
      if (path === overridden || path.startsWith(`${overridden}.`) || path.startsWith(`${overridden}[`)) return option;
    }
    return path === '' ? this.fileName : `${this.fileName}: ${path}`;
  }
}
