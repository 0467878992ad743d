import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const dir = join(import.meta.dirname, '../../../shared/rigging');

describe('shared/rigging', () => {
  it('imports nothing from Vue, Express, TypeORM or the test-only math library', () => {
    for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts'))) {
      const source = readFileSync(join(dir, file), 'utf8');
      const imports = [...source.matchAll(/from\s+'([^']+)'/g)].map((m) => m[1]);
      for (const name of imports) expect(name, `${file} imports ${name}`).toMatch(/^(\.\/|ml-matrix$)/);
    }
  });
});
