import { parseArgs } from "node:util";
import { calibrateCommand } from "./calibration-commands";
import { measureCommand, pkaCommand, spectrumCommand } from "./color-commands";
import { CliError } from "./errors";
import { fitCommand } from "./fit-command";

export { CliError };

const COMMAND_LIST = "measure <image> --roi x,y,w,h, calibrate <image> --patch x,y,w,h=L,a,b, spectrum <csv>, pka <csv>, fit <csv> [--model kamlet-taft|et30|permittivity] or token create --email <user> --name <label>";

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
  // Loaded here so the colour commands start without the database and auth modules.
  const [{ eq }, { databaseFile, migrateDatabase, openDatabase }, { users }, { createApiToken }, { dataDir }] = await Promise.all([
    import("drizzle-orm"),
    import("../../db/connection"),
    import("../../db/schema"),
    import("../auth/service"),
    import("../config/env"),
  ]);
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

export const COMMANDS: Record<string, Command> = { measure: measureCommand, calibrate: calibrateCommand, spectrum: spectrumCommand, pka: pkaCommand, fit: fitCommand, token: tokenCommand };

export async function runCli(argv: string[]): Promise<unknown> {
  const [name, ...rest] = argv;
  if (!name) throw new CliError(`Give a command: ${COMMAND_LIST}.`);
  const command = COMMANDS[name];
  if (!command) throw new CliError(`Unknown command '${name}'; the commands are ${COMMAND_LIST}.`);
  return command(rest);
}
