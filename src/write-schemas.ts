/** `npm run schemas`: writes the JSON Schemas into schemas/. */
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { SCHEMA_FILES, schemaText } from './schemas.ts';

const root = path.join(path.dirname(fileURLToPath(import.meta.url)), '..');
for (const [file, build] of Object.entries(SCHEMA_FILES)) {
  writeFileSync(path.join(root, file), schemaText(build));
  console.log(`wrote ${file}`);
}
