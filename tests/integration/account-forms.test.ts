// The welcome and account forms through Conform (real PostgreSQL): what a person typed comes back
// with the field's message on a 400, and a saved form changes the stored row.
import { afterAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { userPreferences, users } from "~/db/schema";
import * as accountRoute from "~/routes/account";
import * as welcomeRoute from "~/routes/welcome";
import { openTestDb } from "./db";
import { callRoute, makeUser, sessionCookieFor } from "./auth";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

async function signedInNewcomer() {
  const person = await makeUser(db, "Wren");
  await db.update(users).set({ name: "" }).where(eq(users.id, person.id));
  return { person, cookie: await sessionCookieFor(db, person.id) };
}

describe("The welcome form", () => {
  test("a blank name is answered 400 with the name's message and nothing is saved", async () => {
    const { person, cookie } = await signedInNewcomer();
    const res = await callRoute(welcomeRoute.action, { path: "/welcome", cookie, form: { name: "   ", redirectTo: "/rigs" } });
    expect(res.status).toBe(400);
    expect(res.body).toMatchObject({ result: { status: "error", error: { name: ["Enter the name your crew knows you by."] } } });
    const [row] = await db.select({ name: users.name }).from(users).where(eq(users.id, person.id));
    expect(row?.name).toBe("");
  });

  test("a name is saved trimmed and the person goes where they were heading", async () => {
    const { person, cookie } = await signedInNewcomer();
    const res = await callRoute(welcomeRoute.action, { path: "/welcome", cookie, form: { name: "  Wren  ", redirectTo: "/rigs" } });
    expect(res.status).toBe(302);
    expect(res.location).toBe("/rigs");
    const [row] = await db.select({ name: users.name }).from(users).where(eq(users.id, person.id));
    expect(row?.name).toBe("Wren");
  });
});

describe("The account page's forms", () => {
  test("preferences are saved, and an unticked night-mode box saves false", async () => {
    const { person, cookie } = await signedInNewcomer();
    // The account form always sends the clock choice (a radio group with the stored choice checked).
    const form = { intent: "preferences", lengthUnit: "imperial", cableUnit: "awg", temperatureUnit: "f", clock: "12h" };
    const on = await callRoute(accountRoute.action, { path: "/account", cookie, form: { ...form, nightDefault: "on" } });
    expect(on.status).toBe(200);
    expect(on.body).toMatchObject({ intent: "preferences", ok: "Preferences saved." });
    const off = await callRoute(accountRoute.action, { path: "/account", cookie, form });
    expect(off.status).toBe(200);
    const [row] = await db.select().from(userPreferences).where(eq(userPreferences.userId, person.id));
    expect(row).toMatchObject({ lengthUnit: "imperial", cableUnit: "awg", temperatureUnit: "f", clock: "12h", nightDefault: false });
  });

  test("an unknown unit is answered 400 naming the field, and the stored preferences stay as they were", async () => {
    const { person, cookie } = await signedInNewcomer();
    const res = await callRoute(accountRoute.action, {
      path: "/account",
      cookie,
      form: { intent: "preferences", lengthUnit: "furlongs", cableUnit: "mm2", temperatureUnit: "c" },
    });
    expect(res.status).toBe(400);
    expect(res.body).toMatchObject({ result: { error: { lengthUnit: ["Choose metric or imperial."], "": ["Check the highlighted choices."] } } });
    expect(await db.select().from(userPreferences).where(eq(userPreferences.userId, person.id))).toEqual([]);
  });

  test("a request with no known intent is answered 400, not a 500", async () => {
    const { cookie } = await signedInNewcomer();
    const res = await callRoute(accountRoute.action, { path: "/account", cookie, form: { intent: "launch" } });
    expect(res.status).toBe(400);
  });

  test("the page counts the browsers the person is signed in on", async () => {
    const { person, cookie } = await signedInNewcomer();
    await sessionCookieFor(db, person.id);
    const page = await callRoute(accountRoute.loader, { path: "/account", cookie });
    expect(page.body).toMatchObject({ sessions: 2 });
  });
});
