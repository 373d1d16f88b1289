// Where the grower's broker is and as whom Nichewise signs in (owner only). The password is never
// sent back to the page: only whether one is kept, and why it cannot be read if the key changed.
import { Form } from "react-router";

export type BrokerSettingsView = {
  url: string;
  username: string | null;
  hasPassword: boolean;
  passwordError: string | null;
  caCert: string | null;
  protocolVersion: number;
  enabled: boolean;
  updatedAt: Date;
};

export function BrokerSettings(props: {
  bridge: BrokerSettingsView | null;
  errors: Partial<Record<string, string>>;
  saved: boolean;
}) {
  const { bridge, errors } = props;
  return (
    // Remounted after each save, so a typed password does not stay in the page.
    <Form
      key={String(bridge?.updatedAt ?? "new")}
      method="post"
      className="grid gap-3 sm:grid-cols-2"
      autoComplete="off"
    >
      <div className="sm:col-span-2">
        <label className="label" htmlFor="url">
          Address
        </label>
        <input
          className="field w-full"
          id="url"
          name="url"
          required
          defaultValue={bridge?.url ?? ""}
          aria-describedby="url-hint"
        />
        {errors.url ? <p className="error">{errors.url}</p> : null}
        <p id="url-hint" className="hint">
          Like <code>mqtt://192.168.1.20:1883</code>; <code>mqtts://</code> for TLS (port 8883 unless you give another).
        </p>
      </div>
      <div>
        <label className="label" htmlFor="username">
          User name
        </label>
        <input className="field w-full" id="username" name="username" defaultValue={bridge?.username ?? ""} />
      </div>
      <div>
        <label className="label" htmlFor="password">
          Password
        </label>
        <input
          className="field w-full"
          id="password"
          name="password"
          type="password"
          autoComplete="new-password"
          aria-describedby={bridge?.hasPassword && !bridge.passwordError ? "password-hint" : undefined}
        />
        {bridge?.passwordError ? (
          <p className="error" role="alert">
            {bridge.passwordError}
          </p>
        ) : null}
        {bridge?.hasPassword ? (
          <>
            {bridge.passwordError ? null : (
              <p id="password-hint" className="hint">
                A password is kept: leave this empty to keep it, or type a new one.
              </p>
            )}
            <label className="mt-1 inline-flex items-center gap-2 text-sm">
              <input type="checkbox" name="clearPassword" /> Remove the stored password
            </label>
          </>
        ) : null}
      </div>
      <div>
        <label className="label" htmlFor="protocolVersion">
          MQTT version
        </label>
        <select
          className="field w-full"
          id="protocolVersion"
          name="protocolVersion"
          defaultValue={String(bridge?.protocolVersion ?? 4)}
        >
          <option value="4">3.1.1</option>
          <option value="5">5</option>
        </select>
      </div>
      <div>
        <span className="label">Connection</span>
        <label className="inline-flex items-center gap-2">
          <input type="checkbox" name="enabled" defaultChecked={bridge?.enabled ?? true} /> Take readings from this
          broker
        </label>
      </div>
      <div className="sm:col-span-2">
        <label className="label" htmlFor="caCert">
          Your own CA certificate, for mqtts:// (optional, PEM)
        </label>
        <textarea
          className="field h-24 w-full font-mono text-xs"
          id="caCert"
          name="caCert"
          defaultValue={bridge?.caCert ?? ""}
        />
        {errors.caCert ? <p className="error">{errors.caCert}</p> : null}
      </div>
      <p className="hint sm:col-span-2">
        Give Nichewise a user of its own on the broker, allowed to read your sensors' topics. The password is kept
        encrypted so Nichewise can reconnect by itself, and is never shown again. A reading is confirmed to the broker
        only once it is stored, so nothing is lost while Nichewise restarts.
      </p>
      <div className="flex items-center gap-3 sm:col-span-2">
        <button className="btn" name="intent" value="save">
          Save and connect
        </button>
        {props.saved ? <span className="text-sm text-good">Saved</span> : null}
      </div>
    </Form>
  );
}
