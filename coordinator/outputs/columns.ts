// Parquet columns derived from the row schemas in schemas/ (the contract): JSON Schema `number` → DOUBLE,
// `integer` → INT64, `string` → UTF8, `boolean` → BOOLEAN; a schema that allows null gives a nullable column.
import { z } from 'zod';
import type { ColumnSpec } from './parquet.js';

type JsonType = string | string[] | undefined;
interface JsonProp {
  type?: JsonType;
  /** zod writes a nullable integer (which carries bounds) as anyOf: [{ type: integer, … }, { type: null }]. */
  anyOf?: JsonProp[];
}

function typesOf(prop: JsonProp): string[] {
  return ([] as string[]).concat(prop.type ?? [], ...(prop.anyOf ?? []).map(typesOf));
}

/** A row schema's columns: JSON Schema `number` → DOUBLE, `integer` → INT64, `string` → UTF8, `boolean` → BOOLEAN. */
export function columnsFromRowSchema(schema: z.ZodObject): Array<ColumnSpec & { nullable: boolean }> {
  const json = z.toJSONSchema(schema, { io: 'output' }) as { properties: Record<string, JsonProp> };
  return Object.entries(json.properties).map(([name, prop]) => {
    const types = typesOf(prop);
    const base = types.filter((t) => t !== 'null');
    if (base.length !== 1) throw new Error(`columnsFromRowSchema: column ${name} has no single type (${types.join(', ')})`);
    const map: Record<string, ColumnSpec['type']> = { number: 'DOUBLE', integer: 'INT64', string: 'UTF8', boolean: 'BOOLEAN' };
    const type = map[base[0]];
    if (!type) throw new Error(`columnsFromRowSchema: column ${name} is a ${base[0]}, not a flat value`);
    return { name, type, nullable: types.includes('null') };
  });
}

