export function App() {
  return <main className="p-8 font-sans">Gridwright console</main>;
}
