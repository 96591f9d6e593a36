import { useLoaderData } from "react-router";
// The same loader as Tilldawn's home page.
export { loader } from "~/routes/home";

export default function Home() {
  const data = useLoaderData() as { signedIn: boolean; rigs: { id: string; name: string }[] };
  return (
    <main>
      <h1>Will the battery bank last till dawn?</h1>
      <p>Tilldawn answers in one look: how long the bank lasts at tonight's loads, and what to switch off if it falls short.</p>
      <ul>{data.rigs.map((r) => <li key={r.id}>{r.name}</li>)}</ul>
    </main>
  );
}
