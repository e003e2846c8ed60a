import { describe, expect, it } from 'vitest';
import committedSchema from '../schema/diagram.schema.json?raw';
import { catalogue } from './catalogue/index.ts';
import { diagramJsonSchema, diagramJsonSchemaText } from './schema.ts';

describe('JSON Schema export', () => {
  it('the committed schema/diagram.schema.json equals the one generated from the zod schema (regenerate with scripts/write-generated.ts)', () => {
    expect(committedSchema).toBe(diagramJsonSchemaText());
  });
  it('describes every block kind with its own parameter names', () => {
    const s = diagramJsonSchema() as any;
    const variants = s.properties.blocks.items.oneOf as any[];
    expect(variants.map((v) => v.properties.kind.const)).toEqual(catalogue.map((c) => c.kind));
    for (const [i, spec] of catalogue.entries()) {
      expect(Object.keys(variants[i].properties.params.properties)).toEqual(spec.params.map((p) => p.name));
      expect(variants[i].properties.params.additionalProperties).toBe(false);
    }
    expect(s.properties.blocks.maxItems).toBe(2000);
  });
});
