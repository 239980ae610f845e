/** Bad command-line input: the message is the one sentence printed on stderr. */
export class CliError extends Error {}
