/**
 * Forms read through Conform + zod: the action parses with `parseWithZod` and answers
 * `submission.reply()`; the page hands that back to `useForm({ lastResult })`, which shows the
 * field errors and keeps what was typed. A page with several forms answers which one (`intent`).
 */
import type { SubmissionResult } from "@conform-to/react";

export type FormAnswer<Intent extends string = string> = {
  intent: Intent;
  result: SubmissionResult<string[]>;
  /** A line to show when the form was saved. */
  ok?: string;
};

/** The form's `intent` field when it is one of the page's intents, else null. */
export function readIntent<T extends Record<string, string>>(form: FormData, intents: T): T[keyof T] | null {
  const value = form.get("intent");
  return typeof value === "string" && (Object.values(intents) as string[]).includes(value) ? (value as T[keyof T]) : null;
}

/** This form's last answer, if the page's last answer was for it. */
export function answerFor<Intent extends string>(answer: FormAnswer<Intent> | undefined, intent: Intent): SubmissionResult<string[]> | undefined {
  return answer?.intent === intent ? answer.result : undefined;
}

/** The first form-level error (`reply({ formErrors })`) of a result. */
export function formError(result: SubmissionResult<string[]> | undefined): string | undefined {
  return result?.error?.[""]?.[0];
}

/**
 * The props a `Field` takes from a Conform field: its name, what to show in it (what was typed
 * last, else `fallback`) and its first error. Pass the field's `key` separately.
 */
export function fieldProps(field: { name: string; initialValue?: unknown; errors?: string[] }, fallback = "") {
  return {
    name: field.name,
    defaultValue: typeof field.initialValue === "string" ? field.initialValue : fallback,
    error: field.errors?.[0],
  };
}
