// node-postgres 8 with pg-cursor and pg-copy-streams against plumb serve:
// $1 parameters, arrays, a cursor read in batches, and COPY both ways.
// NODE_PATH points at the node_modules .ci/run installs (versions pinned in
// package.json and package-lock.json beside this file).
const { Client } = require('pg');
const Cursor = require('pg-cursor');
const { from: copyFrom, to: copyTo } = require('pg-copy-streams');
const { pipeline } = require('stream/promises');
const { Readable, Writable } = require('stream');
const assert = require('assert');

const rows = [];
async function check(operation, fn) {
  try {
    const r = await fn();
    rows.push([operation, 'ok', r === undefined ? '' : JSON.stringify(r)]);
  } catch (e) {
    if (process.env.PLUMB_TRACE) console.error(e);
    rows.push([operation, 'FAIL', `${e.name}: ${String(e.message).split('\n')[0]}`]);
  }
}

async function main() {
  const c = new Client({
    host: process.env.PLUMB_HOST, port: Number(process.env.PLUMB_PORT),
    user: process.env.PLUMB_USER, password: process.env.PLUMB_PASSWORD, database: 'plumb',
  });
  await c.connect();
  await check('$1 parameters', async () => {
    const r = await c.query('SELECT $1::INTEGER + 1 AS n, $2 AS s', [41, 'plumb']);
    assert.deepStrictEqual([r.rows[0].n, r.rows[0].s], [42, 'plumb']);
    return r.rows[0];
  });
  await check('array parameter and result', async () => {
    const r = await c.query('SELECT difference($1) AS d, $2::VARCHAR[] AS t', [[1, 4, 9, 16], ['a', 'b c', null]]);
    assert.deepStrictEqual(r.rows[0].d, [3, 5, 7]);
    assert.deepStrictEqual(r.rows[0].t, ['a', 'b c', null]);
    return r.rows[0];
  });
  await check('diagnose($1, ...)', async () => {
    const r = await c.query("SELECT count(*)::INTEGER AS n FROM diagnose($1, by := ['shop', 'product'], at := 'day', value := 'units')", [process.env.PLUMB_SHOPS]);
    assert.strictEqual(r.rows[0].n, 12);
    return r.rows[0].n;
  });
  await check('pg-cursor, batches of 100', async () => {
    const cursor = c.query(new Cursor('SELECT i FROM range(1000) t(i) ORDER BY i'));
    let sum = 0, batches = 0;
    for (;;) {
      const batch = await cursor.read(100);
      if (batch.length === 0) break;
      batches++;
      for (const r of batch) sum += Number(r.i);
    }
    await cursor.close();
    assert.strictEqual(sum, 499500);
    return `${batches} batches`;
  });
  await check('pg-copy-streams COPY FROM STDIN', async () => {
    await c.query('CREATE TABLE node_in (i INTEGER, s VARCHAR)');
    const lines = [];
    for (let i = 0; i < 500; i++) lines.push(`${i}\t${i % 5 === 0 ? '\\N' : 's' + i}\n`);
    await pipeline(Readable.from(lines), c.query(copyFrom('COPY node_in FROM STDIN')));
    const r = await c.query('SELECT count(*)::INTEGER AS n, count(s)::INTEGER AS s FROM node_in');
    assert.deepStrictEqual([r.rows[0].n, r.rows[0].s], [500, 400]);
    return r.rows[0];
  });
  await check('pg-copy-streams COPY TO STDOUT', async () => {
    let text = '';
    await pipeline(c.query(copyTo('COPY (SELECT i, s FROM node_in ORDER BY i LIMIT 3) TO STDOUT')),
      new Writable({ write(chunk, enc, done) { text += chunk; done(); } }));
    assert.strictEqual(text, '0\t\\N\n1\ts1\n2\ts2\n');
    return text;
  });
  await c.end();
  const width = Math.max(9, ...rows.map((r) => r[0].length));
  console.log(`${'operation'.padEnd(width)} | result | detail`);
  console.log(`${'-'.repeat(width)}-+--------+-------`);
  for (const r of rows) console.log(`${r[0].padEnd(width)} | ${r[1].padEnd(6)} | ${r[2].slice(0, 160)}`);
  const failed = rows.filter((r) => r[1] !== 'ok').length;
  console.log(`node-postgres: ${rows.length - failed} passed, ${failed} failed`);
  process.exit(failed ? 1 : 0);
}
main().catch((e) => { console.error(e); process.exit(1); });
