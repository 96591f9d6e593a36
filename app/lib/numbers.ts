/**
 * The one reader of numbers a person typed or a file held: a decimal comma ("13,2") or point,
 * spaces inside ("1 200"), a sign and an exponent. Empty text is null (no value); anything
 * else that is not a number is "bad", so the caller can say which field is wrong.
 */
export function parseDecimal(text: string | null | undefined): number | null | "bad" {
  const t = (text ?? "").trim().replace(/\s+/g, "").replace(",", ".");
  if (t === "") return null;
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t)) return "bad";
  return Number(t);
}
