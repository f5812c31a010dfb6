import { describe, expect, it } from "vitest";
import { BASE_URL } from "../support/http-session";

describe("GET /api/v1/openapi.json", () => {
  it("serves the OpenAPI 3.1 document to anyone, without a session", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/openapi.json`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("application/json");
    const doc = await res.json();
    expect(doc.openapi).toBe("3.1.0");
    expect(doc.info.title).toBe("Bellwether API");
    expect(Object.keys(doc.paths)).toEqual(expect.arrayContaining(["/api/v1/scores", "/api/v1/analytes/{code}", "/api/v1/openapi.json"]));
    expect(doc.paths["/api/v1/openapi.json"].get.security).toEqual([]);
  });

  it("refuses another method with 405, as every route does for a method it does not serve", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/openapi.json`, { method: "POST" });
    expect(res.status).toBe(405);
  });
});
