/** The help texts, one per command; `plumbline <command> --help` prints its own. */
import { TOOL } from '../version.ts';

const EXIT_TEXT = `Exit status: 0 done, 1 done but a characteristic could not be assessed,
2 bad input or usage (nothing written), 70 a fault in plumbline.`;

export const HELP: Readonly<Record<string, string>> = {
  main: `plumbline ${TOOL.version} — control-limit decisions and review packs from plain files

Usage:
  plumbline init <dir>                      start a small working workspace in <dir>
  plumbline check <workspace>               validate the workspace and print its problems; writes nothing
  plumbline build <workspace> --out <dir>   assess every characteristic and write the pack to <dir>
  plumbline ledger <workspace> add ...      append one decision to ledger.csv, checked as build would
  plumbline ledger <workspace> accept ...   append the ledger lines the last build proposed
  plumbline verify <pack>                   check a pack against its manifest.json

Options:
  -h, --help       show help (also: plumbline <command> --help)
  -v, --version    print the version

${EXIT_TEXT}`,
  verify: `Usage: plumbline verify <pack> [--workspace <dir>] [--json]

Checks every file of a pack against the SHA-256 its manifest.json lists, and
reports files changed, missing, or added since the build. With --workspace,
also checks that the inputs listed are those of <dir>. Prints the SHA-256 of
manifest.json itself: compare it with the sender's by another channel, since
a manifest rewritten together with the files would pass the file check.

Options:
  -w, --workspace <dir>   also check the inputs against this workspace
      --json              print the result as JSON on stdout

Exit status: 0 intact, 1 a difference was found, 2 not a pack or bad usage.`,
  init: `Usage: plumbline init <dir>

Creates <dir> with a review.yaml that explains every field, one small data
file per common chart family (individuals, xbar-r, p, c, u) and an empty
ledger.csv. check and build accept it at once; edit it into your own.
<dir> must not exist yet, or be empty.

${EXIT_TEXT}`,
  check: `Usage: plumbline check <workspace> [--quiet] [--json]

Reads review.yaml, every data file and ledger.csv, and prints each problem as
file:line:column with a sentence saying what is wrong. Writes nothing.

Options:
  -q, --quiet   print errors only
      --json    print the result as JSON on stdout (diagnostics and each characteristic's action)
  -h, --help    show this help

Exit status: 0 no errors, 1 a characteristic has errors, 2 review.yaml is unusable.`,
  build: `Usage: plumbline build <workspace> --out <dir> [--date YYYY-MM-DD] [--previous <pack>] [--paper a4|letter] [--png] [--only tag=NAME] [--jobs N] [--no-cache] [--quiet] [--json]

Assesses every characteristic (limits, signals, a recommendation) and writes
the review pack to <dir>: index.md with charts/*.svg, index.html, pack.pdf,
summary.json, record.json (what the next build compares with) and
manifest.json. The folder is replaced whole, and only once
everything is ready. A build cache in <dir>/.plumbline-cache lets the next
build redo only the characteristics whose inputs changed; it is not part of
the pack (the manifest does not list it, verify passes over it).

Options:
  -o, --out <dir>         where the pack goes (required; a new or earlier pack folder)
  -d, --date <date>       the build date: written on proposed ledger lines and in the PDF (default: the period's end)
      --previous <pack>   an earlier pack to compare with ("Since the last review"); by default the pack already in --out
      --paper <size>      PDF paper size, a4 (default) or letter
      --png               also write charts/*.png (twice the chart size, for slides and e-mail)
      --only tag=NAME     a customer's pack: only the characteristics tagged NAME, with the
                          customer's name from review.yaml customers on the cover
  -j, --jobs <n>          threads for a build with --png: PNGs are drawn on all but one while the
                          pages are laid out (default: every core)
      --no-cache          neither read nor leave the build cache
  -q, --quiet             print errors and the one-line result only
      --json              print the result as JSON on stdout
  -h, --help              show this help

${EXIT_TEXT}`,
  ledger: `Usage:
  plumbline ledger <workspace> add --characteristic <id> --action <action> --point <label> --reason <text> [--by <name>] [--date YYYY-MM-DD]
  plumbline ledger <workspace> accept --from <pack> [--only <id>] [--by <name>] [--yes]

add      appends one row to ledger.csv after checking it against the data and
         the ledger exactly as build would (actions: baseline, freeze, exclude,
         include, change, reviewed, note; --date defaults to today).
accept   appends the ledger lines that the build in <pack> proposed, showing
         each and asking before it is added unless --yes.

Rows already in ledger.csv are never rewritten; new rows keep the file's line
endings and are written in one append.

${EXIT_TEXT}`,
};
