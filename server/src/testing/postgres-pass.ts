// The PostgreSQL pass of the server's database tests (jest project `server-pg`): every test app runs on
// PostgreSQL, each in a fresh schema of the `test` database (see startTestApp). Run before each test file.
process.env['EQUILIGHT_TEST_DATABASE'] = 'postgres';
// A round trip to PostgreSQL costs more than one to a SQLite file in the same process (test files that set
// their own timeout keep it).
jest.setTimeout(30_000);
