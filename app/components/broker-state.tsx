// The bridge's state on the home-broker page: connected or not, its last message, its counts and its
// last problem, in the grower's words.
import { timeAgo } from "~/lib/date-words";

export type BrokerCounts = {
  stored: number;
  rejected: number;
  outsideSpot: number;
  otherDevices: number;
  heldBack: number;
  staleRetained: number;
};
export type BrokerStateView = {
  status: "connecting" | "connected" | "offline" | "stopped";
  connectedSince: number | null;
  lastMessageAt: number | null;
  lastError: { at: number; message: string } | null;
  counts: BrokerCounts;
};

const STATUS_WORDS = {
  connecting: "Connecting…",
  connected: "Connected",
  offline: "Not connected — trying again",
  stopped: "Stopped",
} as const;

export function BrokerState(props: {
  state: BrokerStateView | null;
  enabled: boolean;
  passwordError: string | null;
  attached: number;
  now: number;
}) {
  const { state, now } = props;
  const c = state?.counts;
  const heading = props.passwordError
    ? "Waiting for the password"
    : state
      ? STATUS_WORDS[state.status]
      : props.enabled
        ? "Not running in this server yet"
        : "Switched off";
  return (
    <div className="card space-y-2" data-testid="bridge-state">
      <p className="font-semibold">
        {heading}
        {state?.connectedSince ? (
          <span className="font-normal text-muted"> · since {timeAgo(new Date(state.connectedSince), now)}</span>
        ) : null}
      </p>
      {props.passwordError ? (
        <p className="text-sm text-poor" role="alert">
          {props.passwordError} (Broker settings, below.)
        </p>
      ) : props.attached === 0 ? (
        <p className="text-sm">
          No topic is attached yet, so no readings are taken: listen below and attach your sensors' topics.
        </p>
      ) : (
        <p className="text-sm">
          Last message: {state?.lastMessageAt ? timeAgo(new Date(state.lastMessageAt), now) : "none yet"}
          {c ? ` · ${c.stored} readings stored, ${c.rejected} refused (see each sensor's page for why)` : null}
          {c?.outsideSpot ? ` · ${c.outsideSpot} fall outside any spot (place their sensor on its page)` : null}
          {c?.otherDevices ? ` · ${c.otherDevices} messages from devices not attached` : null}
          {c?.heldBack ? ` · ${c.heldBack} times a topic sent too fast and was slowed` : null}
          {c?.staleRetained ? ` · ${c.staleRetained} old kept values skipped (they carry no time)` : null}
        </p>
      )}
      {state?.lastError && !props.passwordError ? (
        <p className="text-sm text-poor" role="status">
          Last problem ({timeAgo(new Date(state.lastError.at), now)}): {state.lastError.message}
        </p>
      ) : null}
    </div>
  );
}
