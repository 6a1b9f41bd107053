package table

import (
	"bytes"
	"encoding/binary"
	"errors"
	"hash/crc32"
)

// withSoftware returns the PNG image b with a tEXt chunk "Software" naming
// the program that made it, right after the header chunk, so that the file
// names its producer as the other exports do (PNG 1.2, section 11.3.4.3:
// tEXt is keyword, a zero byte, then Latin-1 text; each chunk is length,
// type, data and a CRC-32 of type and data).
func withSoftware(b []byte, software string) ([]byte, error) {
	const sigLen, ihdrLen = 8, 8 + 13 + 4 // signature; IHDR's length, type, data, CRC
	if len(b) < sigLen+ihdrLen || !bytes.Equal(b[12:16], []byte("IHDR")) {
		return nil, errors.New("table: not a PNG image")
	}
	data := append([]byte("Software\x00"), latin1(software)...)
	chunk := make([]byte, 0, 12+len(data))
	chunk = binary.BigEndian.AppendUint32(chunk, uint32(len(data)))
	chunk = append(chunk, "tEXt"...)
	chunk = append(chunk, data...)
	chunk = binary.BigEndian.AppendUint32(chunk, crc32.ChecksumIEEE(chunk[4:]))
	at := sigLen + ihdrLen
	out := make([]byte, 0, len(b)+len(chunk))
	out = append(append(append(out, b[:at]...), chunk...), b[at:]...)
	return out, nil
}

// latin1 keeps the characters a tEXt chunk may hold, replacing the rest.
func latin1(s string) []byte {
	var out []byte
	for _, r := range s {
		if r < 0x20 || r > 0xff || (r >= 0x7f && r < 0xa0) {
			r = '?'
		}
		out = append(out, byte(r))
	}
	return out
}
