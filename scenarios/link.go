package scenarios

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"errors"
	"fmt"
	"io"
	"strings"
)

// LinkPrefix introduces the scenario in a share link's fragment.
const LinkPrefix = "#s="

// maxLinkChars bounds the encoded part of a link before it is decoded.
const maxLinkChars = MaxDocumentBytes/3*4 + 4

// Link returns the share link of a scenario relative to the page, "/#s="
// followed by base64url (no padding) of the raw DEFLATE compression of its
// canonical JSON. Prepend the server's origin for an absolute link.
func Link(s *Scenario) (string, error) {
	return new(Linker).Link(s)
}

// Linker makes share links (Link) one after another, reusing its
// compressor: a DEFLATE writer holds about a megabyte of tables, which a
// session making a link per frame of a drag would otherwise allocate
// every frame. The zero Linker is ready to use; it is not safe for
// concurrent use.
type Linker struct {
	zw  *flate.Writer
	buf bytes.Buffer
}

// Link is the package function Link.
func (l *Linker) Link(s *Scenario) (string, error) {
	data, err := Canonical(s)
	if err != nil {
		return "", fmt.Errorf("encode scenario: %w", err)
	}
	l.buf.Reset()
	if l.zw == nil {
		if l.zw, err = flate.NewWriter(&l.buf, flate.BestCompression); err != nil {
			return "", err
		}
	} else {
		l.zw.Reset(&l.buf)
	}
	l.zw.Write(data)
	if err := l.zw.Close(); err != nil {
		return "", err
	}
	return "/" + LinkPrefix + base64.RawURLEncoding.EncodeToString(l.buf.Bytes()), nil
}

// IsLink reports whether ref looks like a share link: a URL or fragment
// holding "#s=", or a bare "s=…".
func IsLink(ref string) bool {
	return strings.Contains(ref, LinkPrefix) || strings.HasPrefix(ref, "s=")
}

// ParseLink decodes a share link: a whole URL, the fragment "#s=…", or
// "s=…". Corrupt, truncated or oversized links, and links that inflate past
// MaxDocumentBytes (compression bombs), give an error wrapping ErrInvalid;
// the scenario inside is then decoded and validated as Decode does.
func ParseLink(link string) (*Scenario, error) {
	data, err := linkPayload(link)
	if err != nil {
		return nil, err
	}
	s, err := Decode(data)
	if err != nil {
		return nil, fmt.Errorf("share link holds an invalid scenario:\n%w", err)
	}
	return s, nil
}

func linkError(format string, args ...any) error {
	return fmt.Errorf("share link: "+format+": %w", append(args, ErrInvalid)...)
}

// linkPayload extracts and inflates the canonical JSON of a link.
func linkPayload(link string) ([]byte, error) {
	link = strings.TrimSpace(link)
	enc := ""
	switch i := strings.Index(link, LinkPrefix); {
	case i >= 0:
		enc = link[i+len(LinkPrefix):]
	case strings.HasPrefix(link, "s="):
		enc = link[2:]
	default:
		return nil, linkError("no %q part found", LinkPrefix)
	}
	if j := strings.IndexAny(enc, "&#"); j >= 0 {
		enc = enc[:j]
	}
	if enc == "" {
		return nil, linkError("empty scenario part")
	}
	if len(enc) > maxLinkChars {
		return nil, linkError("%d characters exceed the limit of %d", len(enc), maxLinkChars)
	}
	raw, err := base64.RawURLEncoding.DecodeString(strings.TrimRight(enc, "="))
	if err != nil {
		return nil, linkError("not base64url text (%v); was it cut short or altered when copied?", err)
	}
	zr := flate.NewReader(bytes.NewReader(raw))
	defer zr.Close()
	data, err := io.ReadAll(io.LimitReader(zr, MaxDocumentBytes+1))
	switch {
	case errors.Is(err, io.ErrUnexpectedEOF):
		return nil, linkError("the compressed data ends early; the link was probably cut short")
	case err != nil:
		return nil, linkError("the compressed data is corrupt (%v)", err)
	case len(data) > MaxDocumentBytes:
		return nil, linkError("the scenario inflates past the limit of %d bytes", MaxDocumentBytes)
	}
	return data, nil
}
