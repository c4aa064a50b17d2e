import postgres from 'postgres';
import { afterAll, describe, expect, it } from 'vitest';
import { testDatabaseUrl } from './support/database';

// The driver (postgres 3.4.9) wrote to a connection's socket after the database had closed it,
// which threw outside any promise and took the server down (porsager/postgres#1208). The project
// patches it (patches/postgres+3.4.9.patch); this is the case that crashed: a transaction whose
// backend is killed while a statement is in flight (the driver then sends its own ROLLBACK).
const admin = postgres(testDatabaseUrl(), { max: 1, onnotice: () => {} });
const db = postgres(testDatabaseUrl(), { max: 2, onnotice: () => {} });

afterAll(async () => {
  await db.end({ timeout: 1 });
  await admin.end();
});

describe('the database driver when a connection is killed', () => {
  it('a transaction whose backend was terminated rejects with a connection error and the process carries on', async () => {
    let pid: number | undefined;
    const outcome = db.begin(async (tx) => {
      [{ pid }] = await tx<{ pid: number }[]>`select pg_backend_pid() as pid`;
      await tx`select pg_sleep(2)`; // in flight when the backend is killed
    });
    while (pid === undefined) await new Promise((resolve) => setTimeout(resolve, 20));
    await admin`select pg_terminate_backend(${pid})`;
    await expect(outcome).rejects.toMatchObject({ code: expect.stringMatching(/CONNECTION_|57P01/) });
    // The pool opens a fresh connection for the next query.
    const [{ one }] = await db<{ one: number }[]>`select 1 as one`;
    expect(one).toBe(1);
  });
});
