/** `npm run seed`: create the demo workshop (idempotent). */
import { closeDb } from '../src/lib/server/db';
import { seedDemo } from '../src/lib/server/seed/demo';

const made = await seedDemo();
console.log(made ? `Demo workshop: ${made} record(s) created.` : 'Demo workshop already present.');
await closeDb();
