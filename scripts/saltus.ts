/**
 * `npm run saltus -- <command>`: administration from the command line (SQLite or PostgreSQL, per DATABASE_URL).
 *   backup [file]    write every table, audit trail included, to one archive (default backups/saltus-<time>.json.gz)
 *   restore <file>   load an archive into an empty database (SQLite or PostgreSQL, per DATABASE_URL)
 *   migrate          apply pending migrations
 *   user add --email a@b --name "…" --role admin|planner|operator|viewer [--password-stdin]
 *                    (without --password-stdin the password is asked for; at least 12 characters)
 *   user list | user disable --email a@b
 *   token create --role planner --name rig-pc [--expires-days N]   prints the token once
 *   token list | token revoke --name rig-pc
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { isDomainError } from '../src/domain/errors';
import { createToken, createUser, disableUser, listTokens, listUsers, revokeToken } from '../src/server/auth/accounts';
import { checkPasswordStrength } from '../src/server/auth/passwords';
import { createArchive, decodeArchive, encodeArchive, restoreArchive } from '../src/server/backup/archive';
import { closeDb } from '../src/server/db/client';
import { databaseConfig } from '../src/server/db/config';
import { migrate } from '../src/server/db/migrate';

const USAGE = `usage: npm run saltus -- backup [file] | restore <file> | migrate
       npm run saltus -- user add --email a@b --name "Full Name" --role admin|planner|operator|viewer [--password-stdin]
       npm run saltus -- user list | user disable --email a@b
       npm run saltus -- token create --role planner --name rig-pc [--expires-days N] | token list | token revoke --name rig-pc`;

/** --flag value pairs and bare --switches. */
function options(args: string[]): Record<string, string | true> {
  const out: Record<string, string | true> = {};
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (!a.startsWith('--')) continue;
    const eq = a.indexOf('=');
    if (eq > 0) out[a.slice(2, eq)] = a.slice(eq + 1);
    else if (args[i + 1] !== undefined && !args[i + 1]!.startsWith('--')) out[a.slice(2)] = args[++i]!;
    else out[a.slice(2)] = true;
  }
  return out;
}

function need(opts: Record<string, string | true>, name: string, example: string): string {
  const v = opts[name];
  if (typeof v !== 'string' || v.trim() === '') throw new Error(`give --${name}, e.g. --${name} ${example}`);
  return v;
}

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const c of process.stdin) chunks.push(c as Buffer);
  return Buffer.concat(chunks).toString('utf8').replace(/\r?\n$/, '');
}

/** Asks on the terminal without echoing what is typed. */
function prompt(question: string): Promise<string> {
  if (!process.stdin.isTTY) throw new Error('no terminal to ask for the password: pipe it in with --password-stdin');
  return new Promise((resolve) => {
    const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
    const out = rl as unknown as { _writeToOutput: (s: string) => void; output: NodeJS.WriteStream };
    out._writeToOutput = (s: string) => {
      if (s.includes(question)) out.output.write(s);
    };
    rl.question(question, (answer) => {
      rl.close();
      process.stdout.write('\n');
      resolve(answer);
    });
  });
}

const table = (rows: Record<string, unknown>[]) => (rows.length ? console.table(rows) : console.log('(none)'));

async function user(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  const opts = options(rest);
  await migrate(databaseConfig());
  switch (sub) {
    case 'add': {
      const email = need(opts, 'email', 'name@lab.example');
      const name = need(opts, 'name', '"Full Name"');
      const role = need(opts, 'role', 'planner');
      let password: string;
      if (opts['password-stdin']) password = await readStdin();
      else {
        password = await prompt('password (at least 12 characters): ');
        checkPasswordStrength(password);
        if ((await prompt('the same password again: ')) !== password) throw new Error('the two passwords differ; run the command again');
      }
      const u = await createUser({ email, name, role: role as 'viewer', password }, 'cli');
      console.log(`user added: ${u.email} (${u.name}), role ${u.role}`);
      return 0;
    }
    case 'list':
      table((await listUsers()).map((u) => ({ email: u.email, name: u.name, role: u.role, created: u.createdAt, disabled: u.disabledAt ?? '' })));
      return 0;
    case 'disable': {
      const u = await disableUser(need(opts, 'email', 'name@lab.example'), 'cli');
      console.log(`user disabled: ${u.email}; their sessions were ended`);
      return 0;
    }
    default:
      console.error(USAGE);
      return 2;
  }
}

async function token(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  const opts = options(rest);
  await migrate(databaseConfig());
  switch (sub) {
    case 'create': {
      const days = opts['expires-days'];
      const expiresDays = typeof days === 'string' ? Number(days) : undefined;
      if (days !== undefined && !Number.isInteger(expiresDays)) throw new Error('--expires-days takes a whole number of days, e.g. --expires-days 90');
      const { token: secret, view } = await createToken({ name: need(opts, 'name', 'rig-pc'), role: need(opts, 'role', 'planner') as 'viewer', expiresDays }, 'cli');
      console.log(`token ${view.name} (role ${view.role}${view.expiresAt ? `, expires ${view.expiresAt}` : ''}) — shown only now, store it safely:`);
      console.log(secret);
      console.error('send it as the header "Authorization: Bearer <token>"');
      return 0;
    }
    case 'list':
      table((await listTokens()).map((t) => ({ name: t.name, role: t.role, prefix: `${t.prefix}…`, created: t.createdAt, expires: t.expiresAt ?? '', lastUsed: t.lastUsedAt ?? '', revoked: t.revokedAt ?? '' })));
      return 0;
    case 'revoke': {
      const t = await revokeToken(need(opts, 'name', 'rig-pc'), 'cli');
      console.log(`token revoked: ${t.name}`);
      return 0;
    }
    default:
      console.error(USAGE);
      return 2;
  }
}

async function main(argv: string[]): Promise<number> {
  const [command, ...args] = argv;
  switch (command) {
    case 'backup': {
      const file = args[0] ?? path.join('backups', `saltus-${new Date().toISOString().replace(/[:.]/g, '-')}.json.gz`);
      mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
      const archive = await createArchive();
      writeFileSync(file, encodeArchive(archive));
      const rows = Object.values(archive.tables).reduce((s, t) => s + t.length, 0);
      console.log(`backup: ${rows} rows in ${Object.keys(archive.tables).length} tables written to ${file}`);
      return 0;
    }
    case 'restore': {
      if (!args[0]) {
        console.error('restore: give the archive file, e.g. npm run saltus -- restore backups/saltus-….json.gz');
        return 2;
      }
      await migrate(databaseConfig());
      const counts = await restoreArchive(decodeArchive(readFileSync(args[0])));
      console.log(`restore: ${Object.values(counts).reduce((s, n) => s + n, 0)} rows loaded from ${args[0]}`);
      return 0;
    }
    case 'migrate': {
      const r = await migrate(databaseConfig());
      console.log(r.applied.length ? `applied ${r.applied.join(', ')}` : 'database up to date');
      return 0;
    }
    case 'user':
      return user(args);
    case 'token':
      return token(args);
    default:
      console.error(USAGE);
      return 2;
  }
}

main(process.argv.slice(2))
  .then(async (code) => {
    await closeDb();
    process.exit(code);
  })
  .catch(async (e) => {
    const field = isDomainError(e) && e.field ? ` (${e.field})` : '';
    console.error(`saltus: ${e instanceof Error ? e.message : String(e)}${field}`);
    await closeDb();
    process.exit(1);
  });
