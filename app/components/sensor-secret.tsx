import { useEffect, useState } from "react";

export function useSecretFromFragment() {
  const [secret, setSecret] = useState<string | null>(null);
  useEffect(() => {
    const m = /secret=([a-z2-7]+)/.exec(window.location.hash);
    if (m) {
      // eslint-disable-next-line react-hooks/set-state-in-effect -- read once hydrated: the server never sees a fragment
      setSecret(m[1]);
      // Keep it out of the history and of anything copied from the address bar.
      window.history.replaceState(window.history.state, "", window.location.pathname + window.location.search);
    }
  }, []);
  return secret;
}

export function CopyBlock({ label, text, testId }: { label: string; text: string; testId: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <div>
      <div className="mb-1 flex items-center justify-between">
        <p className="text-sm font-medium">{label}</p>
        <button
          type="button"
          className="text-sm text-accent"
          onClick={() => navigator.clipboard?.writeText(text).then(() => setCopied(true))}
        >
          {copied ? "Copied" : "Copy"}
        </button>
      </div>
      <pre tabIndex={0} className="command" data-testid={testId}>
        {text}
      </pre>
    </div>
  );
}
