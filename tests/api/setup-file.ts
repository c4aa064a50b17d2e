import { afterAll, beforeAll } from 'vitest';
import { closeTestDatabase, truncateAll } from './support/database';

// Each test file starts from empty tables.
beforeAll(async () => {
  await truncateAll();
});

afterAll(async () => {
  await closeTestDatabase();
});
