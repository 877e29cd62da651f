/**
 * The listening page's script as page text: the bundle the build makes of `src/page/listeningPage.ts`
 * (a type-checked browser module; see its header for what it does), read once per process.
 */
import { readFileSync } from 'node:fs';

/** Two folders up from src/compare or dist/compare is the project root. */
const BUNDLE = new URL('../../dist/page/listeningPage.js', import.meta.url);

let bundle: string | null = null;

export function listeningPageScript(): string {
  if (bundle === null) {
    let text: string;
    try {
      text = readFileSync(BUNDLE, 'utf8');
    } catch {
      throw new Error(`the listening page's script is not built (${BUNDLE.pathname} missing): run npm run build`);
    }
    // Inline in a <script> element: its text must not close the element.
    if (/<\/script/i.test(text)) throw new Error("the listening page's script contains </script and cannot be inlined");
    bundle = text;
  }
  return bundle;
}
