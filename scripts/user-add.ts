// npm run user:add -- --email a@b.example --name "A B" --role admin --org "Org" --org-kind owner [--password …] [--token]
import { parseArgs } from 'node:util';
import { closeDb, getDb } from '../db/client';
import { addUser, addUserSchema } from '../lib/services/operators';

async function main() {
  const { values } = parseArgs({
    options: {
      email: { type: 'string' },
      name: { type: 'string' },
      role: { type: 'string' },
      org: { type: 'string' },
      'org-kind': { type: 'string' },
      password: { type: 'string' },
      token: { type: 'boolean', default: false },
    },
    strict: true,
  });
  const parsed = addUserSchema.safeParse({ ...values, orgKind: values['org-kind'] });
  if (!parsed.success) {
    for (const i of parsed.error.issues) console.error(`user:add: ${i.message}`);
    process.exitCode = 2;
    return;
  }
  const out = await addUser(getDb(), parsed.data);
  console.log(`${out.created ? 'created' : 'updated'} ${parsed.data.email} (${parsed.data.role}, ${parsed.data.org})`);
  if (!parsed.data.password && out.created) console.log('no password set: an admin can issue a one-time link or temporary password');
  if (out.token) console.log(out.token);
}

main()
  .catch((err) => {
    console.error(`user:add: ${err instanceof Error ? err.message : String(err)}`);
    process.exitCode = 1;
  })
  .finally(() => closeDb());
