// Quorum command-line interface: the same lib/ code as the web app, for batch and cluster use.
// Usage: npm run -s quorum -- <command> [args]   (prints JSON on stdout, one-line errors on stderr)
import { commands } from './cli/index';

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  const wantsHelp = (args: string[]) => args.includes('--help') || args.includes('-h');
  const command = name ? commands[name] : undefined;
  if (command && wantsHelp(rest)) {
    process.stdout.write(`${command.summary}\n${command.usage}\n`);
    return 0;
  }
  if (!name || name === 'help' || wantsHelp([name])) {
    const list = Object.entries(commands)
      .map(([n, c]) => `  ${n.padEnd(10)} ${c.summary}`)
      .join('\n');
    process.stdout.write(`usage: quorum <command> [args]   (quorum <command> --help for its options)\n${list}\n`);
    return name ? 0 : 2;
  }
  if (!command) {
    const list = Object.entries(commands)
      .map(([n, c]) => `  ${n.padEnd(10)} ${c.summary}`)
      .join('\n');
    process.stderr.write(`${name ? `unknown command "${name}"\n` : ''}usage: quorum <command> [args]\n${list}\n`);
    return 2;
  }
  return command.run(rest);
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (err: unknown) => {
    process.stderr.write(`quorum: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  },
);
