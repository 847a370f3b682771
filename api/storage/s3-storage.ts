/** Uploads in an S3-compatible bucket through the AWS SDK v3 (path-style addressing). */
import { CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, PutObjectCommand, S3Client, S3ServiceException } from '@aws-sdk/client-s3';
import { Readable } from 'node:stream';
import { checkKey, type Storage, type StoredObject } from './storage';

export interface S3Settings {
  endpoint: string;
  bucket: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
}

export class S3Storage implements Storage {
  readonly kind = 's3' as const;
  readonly client: S3Client;
  constructor(readonly settings: S3Settings) {
    this.client = new S3Client({
      endpoint: settings.endpoint,
      region: settings.region,
      forcePathStyle: true,
      credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey },
    });
  }

  async put(key: string, bytes: Buffer, mediaType: string): Promise<void> {
    await this.client.send(new PutObjectCommand({ Bucket: this.settings.bucket, Key: checkKey(key), Body: bytes, ContentType: mediaType, ContentLength: bytes.length }));
  }

  async get(key: string): Promise<StoredObject | null> {
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.settings.bucket, Key: checkKey(key) }));
      if (!r.Body) return null;
      return { body: r.Body as Readable, mediaType: r.ContentType ?? 'application/octet-stream', size: r.ContentLength ?? null };
    } catch (e) {
      if (e instanceof S3ServiceException && (e.name === 'NoSuchKey' || e.$metadata?.httpStatusCode === 404)) return null;
      throw e;
    }
  }

  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.settings.bucket, Key: checkKey(key) }));
  }

  /** Creates the bucket when it is missing (a fresh local fake; a real bucket is made by its owner). */
  async ensureBucket(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.settings.bucket }));
    } catch {
      await this.client.send(new CreateBucketCommand({ Bucket: this.settings.bucket }));
    }
  }

  close(): void {
    this.client.destroy();
  }
}
