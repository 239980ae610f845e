/**
 * S3-compatible object storage (AWS S3, MinIO, Ceph RGW, Garage, …) through @aws-sdk/client-s3.
 * A single PutObject is atomic on S3: readers see the old object, or none, or the whole new one, never
 * a part. Keys are content-addressed, so a repeated write stores identical bytes.
 */
import { DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client, S3ServiceException } from "@aws-sdk/client-s3";
import { assertSafeKey, type ListedObject, type ObjectStore } from "./driver";

export type S3Settings = {
  bucket: string;
  region: string;
  /** e.g. http://127.0.0.1:9000 for a local MinIO; unset for AWS itself. */
  endpoint?: string;
  forcePathStyle: boolean;
  accessKeyId?: string;
  secretAccessKey?: string;
  /** Folder inside the bucket, e.g. "solvatlas/"; empty for the bucket root. */
  keyPrefix: string;
};

function isNotFound(error: unknown): boolean {
  if (error instanceof S3ServiceException) return error.$metadata?.httpStatusCode === 404 || error.name === "NotFound" || error.name === "NoSuchKey";
  return false;
}

export class S3Storage implements ObjectStore {
  readonly description: string;
  private readonly client: S3Client;

  constructor(private readonly settings: S3Settings) {
    this.description = `S3 bucket ${settings.bucket}${settings.endpoint ? ` at ${settings.endpoint}` : ""}`;
    this.client = new S3Client({
      region: settings.region,
      endpoint: settings.endpoint,
      forcePathStyle: settings.forcePathStyle,
      credentials: settings.accessKeyId && settings.secretAccessKey ? { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey } : undefined,
    });
  }

  private full(key: string): string {
    assertSafeKey(key);
    return `${this.settings.keyPrefix}${key}`;
  }

  async write(key: string, bytes: Uint8Array, contentType: string): Promise<{ existed: boolean }> {
    await this.client.send(new PutObjectCommand({ Bucket: this.settings.bucket, Key: this.full(key), Body: bytes, ContentType: contentType, ContentLength: bytes.byteLength }));
    return { existed: false };
  }

  async read(key: string): Promise<Buffer> {
    const res = await this.client.send(new GetObjectCommand({ Bucket: this.settings.bucket, Key: this.full(key) }));
    if (!res.Body) throw new Error(`Empty body for ${key} from ${this.description}`);
    return Buffer.from(await res.Body.transformToByteArray());
  }

  async has(key: string): Promise<boolean> {
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.settings.bucket, Key: this.full(key) }));
      return true;
    } catch (error) {
      if (isNotFound(error)) return false;
      throw error;
    }
  }

  async remove(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.settings.bucket, Key: this.full(key) }));
  }

  async *list(prefix: string): AsyncIterable<ListedObject> {
    let token: string | undefined;
    do {
      const page = await this.client.send(
        new ListObjectsV2Command({ Bucket: this.settings.bucket, Prefix: `${this.settings.keyPrefix}${prefix}`, ContinuationToken: token }),
      );
      for (const item of page.Contents ?? []) {
        if (!item.Key) continue;
        yield { key: item.Key.slice(this.settings.keyPrefix.length), byteSize: item.Size ?? 0, modifiedAt: item.LastModified ?? new Date(0) };
      }
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
  }

  destroy(): void {
    this.client.destroy();
  }
}
