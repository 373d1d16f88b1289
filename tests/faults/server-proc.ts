// The ingest half of the server (the real broker and writer, as app/.server/main.ts starts them)
// alone in a process, for the soak's SIGKILL fault: the process dies with statements in flight and
// PUBACKs unsent, and a new one takes the same port. Reports its port over IPC when listening.
// Run: node --import tsx tests/faults/server-proc.ts <port> (DATABASE_URL in the environment).
import { startBroker } from "~/.server/ingest/broker";
import { ReadingWriter } from "~/.server/ingest/writer";

const writer = new ReadingWriter();
const broker = await startBroker({
  host: "127.0.0.1",
  port: Number(process.argv[2] ?? 0),
  wsPort: null,
  writer,
  log: () => {},
});
process.send!({ port: broker.port });
process.on("message", (msg: { cmd: string }) => {
  if (msg.cmd === "stats") process.send!({ stats: broker.stats });
});
process.on("disconnect", () => process.exit(0)); // the soak went away
