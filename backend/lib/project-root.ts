import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** The nearest folder at or above `from` that holds package.json. */
export function findProjectRoot(from: string): string {
  for (let dir = from; ; dir = path.dirname(dir)) {
    if (fs.existsSync(path.join(dir, 'package.json'))) return dir;
    if (path.dirname(dir) === dir) throw new Error(`No package.json at or above ${from}`);
  }
}

/** The project's folder, the same whether the server runs from the sources (backend/) or built (dist/server/backend/). */
export const projectRoot = findProjectRoot(path.dirname(fileURLToPath(import.meta.url)));
