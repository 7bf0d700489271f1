// Prints where to go and how to sign in as each demo member (used by scripts/start).
import { DEMO_PEOPLE, DEMO_TEAM } from "../../app/demo/people.ts";

const [appUrl, oauthUrl, serverLog] = process.argv.slice(2);
const bold = (s: string) => `\x1b[1m${s}\x1b[0m`;
const accent = (s: string) => `\x1b[36m${s}\x1b[0m`;
const width = Math.max(...DEMO_PEOPLE.map((p) => p.name.length));
const lines = [
  "",
  `  ${bold("Skewsmith is running:")} ${accent(appUrl)}`,
  "",
  `  Sign in: open ${appUrl}, press “Sign in with GitHub”. Development uses a local stand-in for`,
  `  GitHub (${oauthUrl}) that asks which demo account you are; choose one:`,
  "",
  ...DEMO_PEOPLE.map(
    (p) =>
      `    ${p.name.padEnd(width)}  @${p.login.padEnd(18)} ${p.role ? `${p.role} of ${DEMO_TEAM.name}` : "in no team yet (try creating one)"}`,
  ),
  "",
  `  Mail the app sends is caught locally: ${appUrl}/dev/mailbox`,
  `  Server log: ${serverLog}    Press Ctrl-C to stop everything.`,
  "",
];
console.log(lines.join("\n"));
