/**
 * The project's root folder. A module of its own, importing nothing of the server, so that scripts which
 * point DB_NAME (or other settings) somewhere before loading the server's configuration can import it first.
 */
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
