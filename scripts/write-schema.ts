/** `npm run schema`: writes docs/result.schema.json from the zod schema (src/report/result-schema.ts). */
import { writeFileAtomicSync } from '../src/store/atomic.js';
import { resultJsonSchema } from '../src/report/result-schema.js';

writeFileAtomicSync('docs/result.schema.json', resultJsonSchema());
process.stdout.write('wrote docs/result.schema.json\n');
