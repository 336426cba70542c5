// The PostgreSQL pass of the server's database tests (jest project `server-pg`): every test app runs on
// PostgreSQL, each in a fresh schema of the `test` database (see startTestApp).
process.env['EQUILIGHT_TEST_DATABASE'] = 'postgres';
