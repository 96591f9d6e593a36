// The account page's forms in Chromium (Conform): a blank name is refused in the page with the
// field's message, a name and the units are saved and are there after a reload.
import { describe, expect, test } from "vitest";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";

const juniper = setUpJuniper();

describe("The account page", () => {
  test("a blank name shows the field's message; a name and the units are saved and kept after a reload", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, `wren-${Date.now()}@juniper.example`);
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/account`);
    await page.getByRole("heading", { name: "Account", level: 1 }).waitFor();

    const name = page.getByLabel("Name", { exact: true });
    await name.fill("");
    await page.getByRole("button", { name: "Save name" }).click();
    await page.getByText("Enter your name.").waitFor();
    await expect.poll(() => name.getAttribute("aria-invalid")).toBe("true");

    await name.fill("Wren");
    await page.getByRole("button", { name: "Save name" }).click();
    await page.getByText("Name saved.").waitFor();

    await page.getByRole("radio", { name: "Feet" }).check();
    await page.getByRole("radio", { name: "AWG" }).check();
    await page.getByRole("button", { name: "Save preferences" }).click();
    await page.getByText("Preferences saved.").waitFor();

    await page.reload();
    await page.getByRole("heading", { name: "Account", level: 1 }).waitFor();
    expect(await page.getByLabel("Name", { exact: true }).inputValue()).toBe("Wren");
    expect(await page.getByRole("radio", { name: "Feet" }).isChecked()).toBe(true);
    expect(await page.getByRole("radio", { name: "AWG" }).isChecked()).toBe(true);
    expect(await page.getByRole("radio", { name: "Metres" }).isChecked()).toBe(false);
    await context.close();
  });
});
