import { writeFileSync } from 'node:fs';
import { caseFileJsonSchemaText } from '../../src/case';

// `npm run schema`: writes the published case file schema from its one definition (src/case/shape.ts)
const out = 'src/case/case-file.schema.json';
writeFileSync(out, caseFileJsonSchemaText());
console.log(`wrote ${out}`);
