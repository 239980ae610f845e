/**
 * The byte-level checks of photo intake: magic numbers (JPEG: ITU-T T.81 Annex B; PNG: ISO/IEC 15948
 * §5.2; WebP: RIFF container per RFC 9649; TIFF 6.0 §2 byte-order header) and where each image ends.
 */
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { imageEnd, sniffFormat } from "@/lib/storage/photo-intake";

const jpeg = () => sharp({ create: { width: 16, height: 16, channels: 3, background: "#808040" } }).jpeg().toBuffer();

describe("sniffFormat", () => {
  it("recognises the four allow-listed formats by their first bytes", async () => {
    expect(sniffFormat(await jpeg())).toEqual({ format: "jpeg" });
    expect(sniffFormat(await sharp({ create: { width: 4, height: 4, channels: 3, background: "#000" } }).png().toBuffer())).toEqual({ format: "png" });
    expect(sniffFormat(await sharp({ create: { width: 4, height: 4, channels: 3, background: "#000" } }).webp().toBuffer())).toEqual({ format: "webp" });
    expect(sniffFormat(await sharp({ create: { width: 4, height: 4, channels: 3, background: "#000" } }).tiff().toBuffer())).toEqual({ format: "tiff" });
  });

  it("names what a refused file is", () => {
    expect(sniffFormat(Buffer.from("\uFEFF  <svg xmlns='http://www.w3.org/2000/svg'/>"))).toEqual({ other: "an SVG drawing" });
    expect(sniffFormat(Buffer.from([0, 0, 0, 0x18, 0x66, 0x74, 0x79, 0x70, 0x68, 0x65, 0x69, 0x63]))).toMatchObject({ other: expect.stringMatching(/HEIC/) });
    expect(sniffFormat(Buffer.from("BM6\0\0\0"))).toEqual({ other: "a BMP bitmap" });
  });
});

describe("imageEnd", () => {
  it("finds the JPEG end marker, skipping an FF D9 that sits inside a comment segment", async () => {
    const plain = await jpeg();
    expect(imageEnd(plain, "jpeg")).toBe(plain.length);
    const body = Buffer.from("thumbnail \xff\xd9 inside", "latin1");
    const com = Buffer.concat([Buffer.from([0xff, 0xfe, 0, body.length + 2]), body]);
    const withComment = Buffer.concat([plain.subarray(0, 2), com, plain.subarray(2)]);
    expect(imageEnd(withComment, "jpeg")).toBe(withComment.length);
    expect(imageEnd(Buffer.concat([withComment, Buffer.from("PK\x05\x06")]), "jpeg")).toBe(withComment.length);
  });

  it("refuses stray bytes between JPEG segments as damage, not as truncation", async () => {
    const plain = await jpeg();
    const damaged = Buffer.concat([plain.subarray(0, 2), Buffer.from([0, 0]), plain.subarray(2)]);
    expect(() => imageEnd(damaged, "jpeg")).toThrow(/stray bytes between its parts \(at byte 2\)/);
  });

  it("throws for a JPEG without its end marker and a PNG cut inside a chunk", async () => {
    const plain = await jpeg();
    expect(() => imageEnd(plain.subarray(0, plain.length - 2), "jpeg")).toThrow(/truncated/);
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#123456" } }).png().toBuffer();
    expect(imageEnd(png, "png")).toBe(png.length);
    expect(() => imageEnd(png.subarray(0, png.length - 5), "png")).toThrow(/truncated/);
  });

  it("reads the WebP length from its RIFF header and leaves TIFF open", async () => {
    const webp = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#123456" } }).webp().toBuffer();
    expect(imageEnd(webp, "webp")).toBe(webp.length);
    expect(imageEnd(Buffer.from("II*\0"), "tiff")).toBeNull();
  });
});
