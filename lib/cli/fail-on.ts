import { quoteValue } from "../analysis";

/**
 * `--fail-on` rules: conditions on the JSON summary that make the CLI exit 3, so a pipeline can
 * stop a build when a layout is too skewed. Each rule names the condition that FAILS the build:
 *
 *   rule    := key operator value          (no spaces needed; quote the rule in a shell)
 *   key     := an alias below, or a dotted path into the summary (e.g. labelSkew.max.js)
 *   operator:= >  >=  <  <=  =  !=
 *   value   := a number (for all operators) or a word of letters, digits, - and _ that starts
 *              with a letter (for = and != only), e.g. local-updates, true
 *
 * e.g. `--fail-on 'js>0.1'` (weighted JS divergence above 0.1), `--fail-on verdict!=local-updates`.
 * A key that the summary leaves null (not measured) fails its rule: a gate should not pass
 * silently on a figure it could not see.
 */

/** Short names for the figures a gate most often needs, each a path in methods.md §6's summary. */
export const FAIL_ON_ALIASES: Readonly<Record<string, string>> = {
  js: "labelSkew.js",
  tv: "labelSkew.tv",
  hellinger: "labelSkew.hellinger",
  kl: "labelSkew.kl",
  alpha: "labelSkew.dirichletAlpha",
  gini: "quantitySkew.gini",
  zeta2: "heterogeneity.zeta2",
  sigma2: "heterogeneity.sigma2",
  ratio: "advice.ratio",
  verdict: "advice.verdict",
  barrier: "advice.heterogeneityBarrier",
  shards: "shards.length",
};

const SECTIONS = new Set([
  "engineVersion",
  "dataset",
  "shards",
  "labelSkew",
  "quantitySkew",
  "model",
  "heterogeneity",
  "advice",
  "preprocessing",
]);

const OPERATORS = [">=", "<=", "!=", ">", "<", "="] as const;
type Operator = (typeof OPERATORS)[number];

export type FailOnRule = {
  /** The rule as the user wrote it, for messages. */
  text: string;
  path: string;
  operator: Operator;
  value: number | string;
};

/** A rule that does not follow the grammar; the CLI exits 2 with this message. */
export class FailOnRuleError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "FailOnRuleError";
  }
}

const WORD_PATTERN = /^[A-Za-z][\w-]*$/;
const RULE_PATTERN = /^\s*([A-Za-z][\w.]*)\s*(>=|<=|!=|==|>|<|=)\s*(\S(?:.*\S)?)\s*$/;

/** Parses one `--fail-on` rule; throws FailOnRuleError naming what is wrong. */
export function parseFailOnRule(text: string): FailOnRule {
  const match = RULE_PATTERN.exec(text);
  if (!match) {
    throw new FailOnRuleError(
      `--fail-on ${quoteValue(text)}: expected KEY OPERATOR VALUE, e.g. "js>0.1" or "verdict!=local-updates" ` +
        `(operators ${OPERATORS.join(" ")})`,
    );
  }
  const [, key, written, rawValue] = match;
  const operator = (written === "==" ? "=" : written) as Operator;
  const path = FAIL_ON_ALIASES[key] ?? key;
  if (!SECTIONS.has(path.split(".")[0])) {
    throw new FailOnRuleError(
      `--fail-on ${quoteValue(text)}: unknown key ${quoteValue(key)}; use one of ${Object.keys(FAIL_ON_ALIASES).join(", ")} ` +
        `or a dotted path into the summary such as heterogeneity.zeta2Max`,
    );
  }
  const number = Number(rawValue);
  const isNumber = rawValue.trim() !== "" && Number.isFinite(number);
  if (!isNumber && operator !== "=" && operator !== "!=") {
    throw new FailOnRuleError(
      `--fail-on ${quoteValue(text)}: ${quoteValue(rawValue)} must be a number for ${operator}`,
    );
  }
  if (!isNumber && !WORD_PATTERN.test(rawValue)) {
    throw new FailOnRuleError(
      `--fail-on ${quoteValue(text)}: ${quoteValue(rawValue)} must be a number or a word such as local-updates`,
    );
  }
  return { text, path, operator, value: isNumber ? number : rawValue };
}

function readPath(summary: unknown, path: string): unknown {
  let current: unknown = summary;
  for (const segment of path.split(".")) {
    if (current === null || typeof current !== "object" || !(segment in current)) return undefined;
    current = (current as Record<string, unknown>)[segment];
  }
  return current;
}

function compare(actual: number | string | boolean, rule: FailOnRule): boolean {
  const { operator, value } = rule;
  if (operator === "=" || operator === "!=") {
    const equal = String(actual) === String(value);
    return operator === "=" ? equal : !equal;
  }
  const left = actual as number;
  const right = value as number;
  if (operator === ">") return left > right;
  if (operator === ">=") return left >= right;
  if (operator === "<") return left < right;
  return left <= right;
}

export type RuleOutcome = { rule: FailOnRule; actual: unknown; crossed: boolean };

/**
 * Checks each rule against a summary. A path that names no scalar in this summary (a typo in a
 * dotted path) is a FailOnRuleError: the gate cannot say anything about it.
 */
export function checkFailOnRules(summary: unknown, rules: FailOnRule[]): RuleOutcome[] {
  return rules.map((rule) => {
    const actual = readPath(summary, rule.path);
    if (actual === null) return { rule, actual, crossed: true };
    const scalar =
      typeof actual === "number" || typeof actual === "string" || typeof actual === "boolean";
    if (!scalar) {
      throw new FailOnRuleError(
        `--fail-on ${quoteValue(rule.text)}: ${rule.path} is not a number or word in the summary`,
      );
    }
    if (typeof actual !== "number" && rule.operator !== "=" && rule.operator !== "!=") {
      throw new FailOnRuleError(
        `--fail-on ${quoteValue(rule.text)}: ${rule.path} is "${String(actual)}", not a number`,
      );
    }
    return { rule, actual, crossed: compare(actual, rule) };
  });
}

/** One line per crossed rule, for stderr. */
export function describeCrossedRules(outcomes: RuleOutcome[]): string {
  return outcomes
    .filter((outcome) => outcome.crossed)
    .map(({ rule, actual }) =>
      actual === null
        ? `partita: fail-on ${rule.text}: ${rule.path} was not measured (null)\n`
        : `partita: fail-on ${rule.text}: ${rule.path} is ${String(actual)}\n`,
    )
    .join("");
}
