/**
 * Generates a large invented collection into a fresh collection of the dev database, for
 * benchmarks:
 *
 *   tsx db/seed/bench-collection.ts --plants 1000 --seasons 10 [--leads 2] [--measurements 15]
 *     [--seed 1] [--today YYYY-MM-DD] [--chunk 1000] [--owner owner@demo.test] [--name "…"]
 *
 * The database is the one `DATABASE_URL` names, else the project's local dev cluster. The
 * data depend only on the seed and date; the ids get a fresh namespace per run, so the same
 * seed can be loaded more than once. The `--owner` account (default: the demo owner, when it
 * exists) becomes the collection's owner and is recorded as having made the measurements.
 */
import { eq } from 'drizzle-orm';
import { createDatabase } from '../client';
import { collections, memberships, users } from '../schema';
import { databaseUrl } from '../url';
import { generateCollection } from './generate';
import { insertGenerated } from './insert';

interface Args {
  plants: number;
  seasons: number;
  leads: number;
  measurements: number;
  seed: number;
  today: string;
  chunk: number;
  owner: string;
  name: string | null;
}

function parseArgs(argv: string[]): Args {
  const args: Args = { plants: 1000, seasons: 10, leads: 2, measurements: 15, seed: 1, today: new Date().toISOString().slice(0, 10), chunk: 1000, owner: 'owner@demo.test', name: null };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const value = argv[i + 1];
    const key = flag.replace(/^--/, '') as keyof Args;
    if (!flag.startsWith('--') || !(key in args) || value === undefined) {
      throw new Error(`unknown or incomplete option ${flag}; see the comment at the top of db/seed/bench-collection.ts`);
    }
    i++;
    if (key === 'today' || key === 'owner' || key === 'name') args[key] = value;
    else {
      const n = Number(value);
      if (!Number.isFinite(n) || n <= 0) throw new Error(`${flag} takes a positive number`);
      args[key] = n;
    }
  }
  return args;
}

async function main() {
  const args = parseArgs(process.argv.slice(2));
  const idNamespace = Date.now() % 2_147_483_647;

  let started = performance.now();
  const generated = generateCollection({
    seed: args.seed,
    today: args.today,
    plants: args.plants,
    seasons: args.seasons,
    leadsPerPlantPerSeason: args.leads,
    measurementsPerLead: args.measurements,
    idNamespace,
  });
  const generateMs = Math.round(performance.now() - started);
  console.log(
    `generated ${generated.plants.length} plants, ${generated.leads.length} leads, ${generated.measurements.length} measurements, ` +
      `${generated.bloomRecords.length} bloom records, ${generated.careEntries.length} care entries in ${generateMs} ms ` +
      `(seed ${args.seed}, as of ${args.today}, seasons ${generated.seasons[0]}–${generated.currentSeason})`,
  );

  const database = createDatabase(databaseUrl(), { max: 1 });
  try {
    started = performance.now();
    const name = args.name ?? `Benchmark ${args.plants} plants × ${args.seasons} seasons (seed ${args.seed})`;
    const collectionId = await database.db.transaction(async (tx) => {
      const [owner] = await tx.select({ id: users.id }).from(users).where(eq(users.email, args.owner));
      const [collection] = await tx.insert(collections).values({ name, seasonStartMonth: 3, units: 'mm' }).returning({ id: collections.id });
      if (owner) await tx.insert(memberships).values({ collectionId: collection.id, userId: owner.id, role: 'owner' });
      else console.log(`no account ${args.owner}; the collection has no members`);
      const report = await insertGenerated(tx, collection.id, generated, { createdBy: owner?.id ?? null, chunkSize: args.chunk });
      console.log(`inserted ${Object.entries(report.rows).map(([table, n]) => `${n} ${table}`).join(', ')} in ${report.milliseconds} ms`);
      return collection.id;
    });
    console.log(`collection "${name}" (${collectionId}) committed in ${Math.round(performance.now() - started)} ms`);
  } finally {
    await database.close();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
