// Regenerates the committed files derived from code: the JSON Schema of the document and the
// demo diagrams' .loop.json. Run after changing the schema, the catalogue or a demo:
//   npx tsx packages/graph/scripts/write-generated.ts
// (Tests check that the committed files equal what this writes.)
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { diagramJsonSchemaText } from '../src/schema.ts';
import { demoDiagrams } from '../src/demos/index.ts';
import { serializeDiagram } from '../src/document.ts';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));
writeFileSync(here('../schema/diagram.schema.json'), diagramJsonSchemaText());
for (const demo of demoDiagrams) {
  writeFileSync(here(`../src/demos/${demo.id}.loop.json`), serializeDiagram(demo.diagram));
}
console.log(`wrote schema and ${demoDiagrams.length} demo diagrams`);
