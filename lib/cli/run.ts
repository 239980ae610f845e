import { parseArgs } from "node:util";
import { eq } from "drizzle-orm";
import { databaseFile, migrateDatabase, openDatabase } from "../../db/connection";
import { users } from "../../db/schema";
import { createApiToken } from "../auth/service";
import { dataDir } from "../config/env";

export class CliError extends Error {}

const USAGE = "Usage: cli token create --email <user> --name <label> (commands: token).";

type Command = (args: string[]) => Promise<unknown>;

const tokenCommand: Command = async (args) => {
  const [sub, ...rest] = args;
  if (sub !== "create") throw new CliError("Use 'token create --email <user> --name <label>'.");
  let values: { email?: string; name?: string };
  try {
    ({ values } = parseArgs({ args: rest, options: { email: { type: "string" }, name: { type: "string" } }, strict: true }));
  } catch (error) {
    throw new CliError(`${(error as Error).message}. Use 'token create --email <user> --name <label>'.`);
  }
  if (!values.email) throw new CliError("Give the account's e-mail with --email.");
  if (!values.name || !values.name.trim()) throw new CliError("Name the token with --name, e.g. --name plate-reader-script.");
  const db = openDatabase(databaseFile(dataDir()));
  try {
    migrateDatabase(db);
    const user = db.select().from(users).where(eq(users.email, values.email.trim().toLowerCase())).get();
    if (!user) throw new CliError(`No account has the e-mail ${values.email}; invite the person first.`);
    if (user.deactivatedAt) throw new CliError(`The account ${values.email} is deactivated; reactivate it before creating a token.`);
    const { token } = createApiToken(db, { userId: user.id, name: values.name.trim(), actorId: null });
    return { token };
  } finally {
    db.$client.close();
  }
};

export const COMMANDS: Record<string, Command> = { token: tokenCommand };

export async function runCli(argv: string[]): Promise<unknown> {
  const [name, ...rest] = argv;
  if (!name) throw new CliError(USAGE);
  const command = COMMANDS[name];
  if (!command) throw new CliError(`Unknown command '${name}'. ${USAGE}`);
  return command(rest);
}
