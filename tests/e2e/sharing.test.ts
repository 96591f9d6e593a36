import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { baseUrl, launchBrowser, phoneContext } from "./browser";
import { closeAuthDb, signIn } from "./auth";

let browser: Browser;
let close: () => Promise<void>;
beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
});
afterAll(async () => {
  await close?.();
  await closeAuthDb();
});

/** Reads the newest message to `email` on the dev outbox page, in a tab of its own. */
async function fromOutbox(context: BrowserContext, email: string, want: "code" | "invite"): Promise<string> {
  const page = await context.newPage();
  try {
    for (let tries = 0; tries < 50; tries++) {
      await page.goto(`${baseUrl()}/dev/outbox`);
      const message = page.locator("[data-outbox-message]").filter({ hasText: email }).first();
      if (await message.count()) {
        if (want === "code") return (await message.locator("[data-code]").textContent())!.trim();
        return (await message.getByRole("link", { name: "Open the invitation" }).getAttribute("href"))!;
      }
      await page.waitForTimeout(200);
    }
    throw new Error(`no message to ${email} in the outbox`);
  } finally {
    await page.close();
  }
}

async function signInByEmail(page: Page, email: string, name: string) {
  const email_ = page.getByLabel("E-mail address");
  if ((await email_.inputValue()) !== email) await email_.fill(email);
  await page.getByRole("button", { name: "E-mail me a code" }).click();
  await page.getByLabel("Code from the e-mail").waitFor();
  const code = await fromOutbox(page.context(), email, "code");
  expect(code).toMatch(/^\d{6}$/);
  await page.getByLabel("Code from the e-mail").fill(code);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByRole("heading", { name: "What should we call you?" }).waitFor();
  await page.getByLabel("Your name").fill(name);
  await page.getByRole("button", { name: "Continue" }).click();
}

describe("Sharing a rig", () => {
  test("a new person signs in by e-mailed code, creates a rig, invites a guest, and the guest sees it read-only", async () => {
    const tag = crypto.randomUUID().slice(0, 8);
    const ownerEmail = `owner-${tag}@juniper.example`;
    const guestEmail = `guest-${tag}@juniper.example`;
    const rigName = `Kestrel ${tag}`;

    // The owner: sign in with the code from the outbox, then create a rig.
    const owner = await phoneContext(browser);
    const page = await owner.newPage();
    await page.goto(`${baseUrl()}/sign-in`);
    await signInByEmail(page, ownerEmail, "Kit");
    await page.getByRole("heading", { name: "Welcome to Tilldawn" }).waitFor();
    await page.getByRole("link", { name: "Create a rig" }).click();
    await page.getByLabel("Rig name").fill(rigName);
    await page.getByRole("button", { name: "Create rig" }).click();
    await page.getByRole("heading", { level: 1, name: rigName }).waitFor();

    // Invite the guest.
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "People" }).click();
    await page.getByLabel("Their e-mail address").fill(guestEmail);
    await page.getByRole("radio", { name: /Guest/ }).check();
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText(`Invitation sent to ${guestEmail} as guest.`).waitFor();
    await page.getByRole("list", { name: "Pending invitations" }).getByText(guestEmail).waitFor();

    // The guest, in a browser of their own: open the link, sign in as the invited address, join.
    const guest = await phoneContext(browser);
    const guestPage = await guest.newPage();
    const inviteLink = await fromOutbox(guest, guestEmail, "invite");
    await guestPage.goto(inviteLink);
    await guestPage.getByRole("heading", { name: `Join “${rigName}”` }).waitFor();
    await guestPage.getByRole("link", { name: `Sign in as ${guestEmail} to accept` }).click();
    await expect(guestPage.getByLabel("E-mail address").inputValue()).resolves.toBe(guestEmail);
    await signInByEmail(guestPage, guestEmail, "Wren");
    await guestPage.getByRole("button", { name: `Join ${rigName}` }).click();
    await guestPage.getByRole("heading", { level: 1, name: rigName }).waitFor();
    await guestPage.getByTestId("sync-status").getByText("Read-only (guest)").waitFor();

    // Read-only: the members page shows who is on the rig, and no editing control at all.
    await guestPage.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "People" }).click();
    await guestPage.getByRole("heading", { name: "People on this rig" }).waitFor();
    await guestPage.getByRole("list", { name: "Members" }).getByText("Kit", { exact: true }).waitFor();
    for (const control of ["Send invitation", "Change role", "Remove", "Withdraw"]) {
      await expect(guestPage.getByRole("button", { name: control }).count()).resolves.toBe(0);
    }
    await expect(guestPage.getByRole("heading", { name: "Invite someone" }).count()).resolves.toBe(0);
    await expect(guestPage.locator("select, input[type=email]").count()).resolves.toBe(0);

    // The owner now sees the guest on the rig, and the invitation link is used up.
    await page.reload();
    await page.getByRole("list", { name: "Members" }).getByText("Wren", { exact: true }).waitFor();
    const reused = await guestPage.goto(inviteLink);
    expect(reused?.status()).toBe(410);

    await owner.close();
    await guest.close();
  });

  test("the signIn fixture signs the demo guest in; the demo rig shows read-only and a stranger's rig is 404", async () => {
    const context = await phoneContext(browser);
    await signIn(context, "noor@juniper.example");
    const page = await context.newPage();
    await page.goto(baseUrl());
    await page.getByRole("heading", { level: 1, name: "Juniper" }).waitFor();
    await page.getByTestId("sync-status").getByText("Read-only (guest)").waitFor();
    const missing = await page.goto(`${baseUrl()}/rigs/${crypto.randomUUID()}`);
    expect(missing?.status()).toBe(404);
    await context.close();
  });

  test("signing out ends the session: the rig is no longer reachable with the old cookie", async () => {
    const context = await phoneContext(browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/account`);
    const [cookie] = await context.cookies();
    await page.getByRole("button", { name: "Sign out", exact: true }).click();
    await page.getByRole("link", { name: "Sign in" }).first().waitFor();
    const replay = await fetch(`${baseUrl()}/api/v1/me`, { headers: { cookie: `${cookie!.name}=${cookie!.value}` } });
    expect(replay.status).toBe(401);
    await context.close();
  });

  test("a POST from another site is refused", async () => {
    const context = await phoneContext(browser);
    await signIn(context, "ada@juniper.example");
    const [cookie] = await context.cookies();
    const res = await fetch(`${baseUrl()}/rigs`, {
      method: "POST",
      headers: { cookie: `${cookie!.name}=${cookie!.value}`, "content-type": "application/x-www-form-urlencoded", origin: "https://elsewhere.example" },
      body: "name=Forged",
      redirect: "manual",
    });
    // React Router refuses a foreign Origin on page actions first (400); ours answers 403.
    expect([400, 403]).toContain(res.status);
    const bare = await fetch(`${baseUrl()}/rigs`, {
      method: "POST",
      headers: { cookie: `${cookie!.name}=${cookie!.value}`, "content-type": "application/x-www-form-urlencoded" },
      body: "name=Forged",
      redirect: "manual",
    });
    expect(bare.status).toBe(403);
    await context.close();
  });
});
