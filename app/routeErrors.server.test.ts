import { data, redirect, type ServerBuild } from "react-router";
import { describe, expect, it } from "vitest";
import { captureLog } from "./log.server.ts";
import { DomainError } from "./models/errors.ts";
import { runWithRequest } from "./requestContext.server.ts";
import { CLASH_MESSAGE, hardenBuild, UNAVAILABLE_MESSAGE, UNEXPECTED_MESSAGE } from "./routeErrors.server.ts";

type Handler = (args: { request: Request; params: unknown; context: unknown }) => Promise<unknown>;

/** A build of two routes, a page and a resource route, whose loaders throw what the test gives them. */
function buildThrowing(thrown: () => unknown) {
  const loader = async () => {
    throw thrown();
  };
  const build = {
    routes: {
      page: { id: "page", path: "p", module: { default: () => null, loader, action: loader } },
      file: { id: "file", path: "f", module: { loader } },
    },
  } as unknown as ServerBuild;
  const hardened = hardenBuild(build).routes as unknown as Record<string, { module: { loader: Handler; action?: Handler } }>;
  return hardened;
}

const args = { request: new Request("http://app.test/p"), params: {}, context: {} };

async function caught(work: Promise<unknown>): Promise<unknown> {
  try {
    await work;
  } catch (error) {
    return error;
  }
  throw new Error("expected a throw");
}

const pgError = (code: string, constraint?: string) => Object.assign(new Error(`pg ${code}`), { code, constraint });

describe("hardenBuild: every route's loader and action behind one catch-all", () => {
  const request = { id: "req-1", method: "GET", path: "/p", clientAddress: "127.0.0.1", startedAt: 0 };
  const inRequest = <T>(work: () => Promise<T>) => runWithRequest({ ...request }, work);

  it("turns a DomainError into its status and message, next to its field", async () => {
    const routes = buildThrowing(() => new DomainError("That name is taken.", { field: "name", status: 409 }));
    const thrown = (await inRequest(() => caught(routes.page.module.loader(args)))) as { init: { status: number }; data: unknown };
    expect(thrown.init.status).toBe(409);
    expect(thrown.data).toEqual({ message: "That name is taken.", field: "name", requestId: "req-1" });
  });

  it("turns a unique violation into a 409 and an unreachable database into a 503 with Retry-After", async () => {
    const clash = (await inRequest(() => caught(buildThrowing(() => pgError("23505", "x")).page.module.action!(args)))) as {
      init: { status: number };
      data: { message: string };
    };
    expect([clash.init.status, clash.data.message]).toEqual([409, CLASH_MESSAGE]);
    const lines: string[] = [];
    const restore = captureLog((l) => lines.push(l));
    try {
      for (const down of [pgError("ECONNREFUSED"), pgError("57P01"), new Error("Connection terminated unexpectedly")]) {
        const thrown = (await inRequest(() => caught(buildThrowing(() => down).page.module.loader(args)))) as {
          init: { status: number; headers: Record<string, string> };
          data: { message: string };
        };
        expect(thrown.init.status).toBe(503);
        expect(thrown.init.headers["Retry-After"]).toBe("5");
        expect(thrown.data.message).toBe(UNAVAILABLE_MESSAGE);
      }
    } finally {
      restore();
    }
  });

  it("logs anything else with its stack under the request id, and answers 500 with that id", async () => {
    const lines: string[] = [];
    const restore = captureLog((l) => lines.push(l));
    try {
      const thrown = (await inRequest(() => caught(buildThrowing(() => new TypeError("boom")).page.module.loader(args)))) as {
        init: { status: number };
        data: unknown;
      };
      expect(thrown.init.status).toBe(500);
      expect(thrown.data).toEqual({ message: UNEXPECTED_MESSAGE, requestId: "req-1" });
    } finally {
      restore();
    }
    const entry = JSON.parse(lines[0]);
    expect(entry).toMatchObject({
      level: "error",
      msg: "unhandled error",
      requestId: "req-1",
      where: "page loader",
      error: { name: "TypeError", message: "boom" },
    });
    expect(entry.error.stack).toMatch(/TypeError: boom\n\s+at /);
  });

  it("passes redirects through, adds the request id to thrown data, and answers JSON from a resource route", async () => {
    const redirected = await inRequest(() => caught(buildThrowing(() => redirect("/sign-in")).page.module.loader(args)));
    expect((redirected as Response).status).toBe(302);
    const page = (await inRequest(() =>
      caught(buildThrowing(() => data({ message: "Nope" }, { status: 404 })).page.module.loader(args)),
    )) as {
      data: unknown;
    };
    expect(page.data).toEqual({ message: "Nope", requestId: "req-1" });
    const file = (await inRequest(() =>
      caught(buildThrowing(() => data({ message: "Nope" }, { status: 404 })).file.module.loader(args)),
    )) as Response;
    expect(file).toBeInstanceOf(Response);
    expect(file.status).toBe(404);
    expect(file.headers.get("Content-Type")).toMatch(/^application\/json/);
    expect(await file.json()).toEqual({ error: { status: 404, message: "Nope", field: null, requestId: "req-1" } });
  });
});
