// Test images made on the spot with sharp, so no binary fixture has to be trusted or committed.
import zlib from 'node:zlib';
import sharp from 'sharp';

/** Left half red, right half blue: after a rotation the halves show which way it turned. */
export async function halves(width: number, height: number) {
	const left = await sharp({
		create: { width: width / 2, height, channels: 3, background: { r: 220, g: 30, b: 30 } }
	})
		.png()
		.toBuffer();
	return sharp({ create: { width, height, channels: 3, background: { r: 30, g: 30, b: 220 } } }).composite([
		{ input: left, left: 0, top: 0 }
	]);
}

/** An invented place (latitude 51.5 N, longitude 0.1166… W) a photo must never give away. */
export const gpsExif = {
	IFD0: { Make: 'Corvana', Model: 'Tern 6 Pro', Software: 'tidemark-test' },
	IFD3: {
		GPSLatitudeRef: 'N',
		GPSLatitude: '51/1 30/1 0/1',
		GPSLongitudeRef: 'W',
		GPSLongitude: '0/1 7/1 0/1'
	}
};

export const gpsXmp =
	'<x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">' +
	'<rdf:Description rdf:about="" xmlns:exif="http://ns.adobe.com/exif/1.0/" exif:GPSLatitude="51,30.0N" ' +
	'exif:GPSLongitude="0,7.0W"/></rdf:RDF></x:xmpmeta>';

/** A 400 × 300 JPEG with EXIF (GPS, camera), XMP and orientation 6 ("rotate 90° clockwise to view"). */
export async function jpegWithGps() {
	return new Uint8Array(
		await (
			await halves(400, 300)
		)
			.withExif(gpsExif)
			.withXmp(gpsXmp)
			.withMetadata({ orientation: 6 })
			.jpeg({ quality: 90 })
			.toBuffer()
	);
}

export async function png(width = 64, height = 48) {
	return new Uint8Array(await (await halves(width, height)).png().toBuffer());
}

function chunk(type: string, data: Buffer) {
	const len = Buffer.alloc(4);
	len.writeUInt32BE(data.length);
	const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
	const crc = Buffer.alloc(4);
	crc.writeUInt32BE(zlib.crc32(body));
	return Buffer.concat([len, body, crc]);
}

/**
 * A well-formed PNG header (PNG spec, ISO/IEC 15948: signature, IHDR, IDAT, IEND) claiming a canvas
 * of width × height with hardly any data: the shape of a decompression bomb.
 */
export function pngClaiming(width: number, height: number) {
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(width, 0);
	ihdr.writeUInt32BE(height, 4);
	ihdr.set([8, 2, 0, 0, 0], 8); // 8-bit RGB, deflate, no filter method variant, no interlace
	return new Uint8Array(
		Buffer.concat([
			Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
			chunk('IHDR', ihdr),
			chunk('IDAT', zlib.deflateSync(Buffer.alloc(16))),
			chunk('IEND', Buffer.alloc(0))
		])
	);
}

/** The start of a HEIC file: an ISO-BMFF `ftyp` box with major brand `heic` (ISO/IEC 23008-12). */
export function heicHeader() {
	const box = Buffer.alloc(24);
	box.writeUInt32BE(24, 0);
	box.write('ftypheic', 4, 'ascii');
	box.writeUInt32BE(0, 12);
	box.write('mif1heic', 16, 'ascii');
	return new Uint8Array(Buffer.concat([box, Buffer.alloc(64)]));
}
