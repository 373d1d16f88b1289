// The SSR build's entry (vite.config.ts, as in React Router's custom-server template): the routes and
// the server that serves them in one bundle, build/server/index.js, so that every server module is
// loaded once. app/.server/serve.ts (build/nichewise-server.mjs) loads it and calls start().
import * as build from "virtual:react-router/server-build";
import { main, type MainOptions } from "~/.server/main";

export const start = (opts: Omit<MainOptions, "build" | "dev"> = {}) => main({ ...opts, build });
