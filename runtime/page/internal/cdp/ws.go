package cdp

import (
	"bufio"
	"crypto/rand"
	"crypto/sha1"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"sync"
	"time"
)

// conn is the client end of a WebSocket (RFC 6455), as much of it as talking to a local
// browser needs: text messages, fragmentation, ping, close. The standard library has no
// WebSocket client and the protocol's client side is short, so no dependency is taken.
type conn struct {
	c  net.Conn
	r  *bufio.Reader
	wm sync.Mutex
}

// handshakeGUID is the fixed string of RFC 6455, section 1.3.
const handshakeGUID = "258EAFA5-E914-47DA-95CA-C5AB0DC85B11"

func dial(rawURL string) (*conn, error) {
	u, err := url.Parse(rawURL)
	if err != nil || u.Scheme != "ws" {
		return nil, fmt.Errorf("cdp: not a ws:// address: %q", rawURL)
	}
	c, err := net.DialTimeout("tcp", u.Host, 10*time.Second)
	if err != nil {
		return nil, err
	}
	var nonce [16]byte
	rand.Read(nonce[:])
	key := base64.StdEncoding.EncodeToString(nonce[:])
	req := "GET " + u.RequestURI() + " HTTP/1.1\r\nHost: " + u.Host + "\r\nUpgrade: websocket\r\nConnection: Upgrade\r\n" +
		"Sec-WebSocket-Key: " + key + "\r\nSec-WebSocket-Version: 13\r\n\r\n"
	if _, err := io.WriteString(c, req); err != nil {
		c.Close()
		return nil, err
	}
	r := bufio.NewReaderSize(c, 1<<16)
	resp, err := http.ReadResponse(r, nil)
	if err != nil {
		c.Close()
		return nil, err
	}
	sum := sha1.Sum([]byte(key + handshakeGUID))
	if resp.StatusCode != http.StatusSwitchingProtocols ||
		resp.Header.Get("Sec-WebSocket-Accept") != base64.StdEncoding.EncodeToString(sum[:]) {
		c.Close()
		return nil, fmt.Errorf("cdp: websocket handshake refused: %s", resp.Status)
	}
	return &conn{c: c, r: r}, nil
}

// write sends one masked frame (a client must mask, RFC 6455 section 5.3).
func (w *conn) write(op byte, payload []byte) error {
	w.wm.Lock()
	defer w.wm.Unlock()
	h := []byte{0x80 | op}
	n := len(payload)
	switch {
	case n < 126:
		h = append(h, 0x80|byte(n))
	case n < 1<<16:
		h = append(h, 0x80|126, byte(n>>8), byte(n))
	default:
		h = append(h, 0x80|127)
		h = binary.BigEndian.AppendUint64(h, uint64(n))
	}
	var mask [4]byte
	rand.Read(mask[:])
	h = append(h, mask[:]...)
	buf := make([]byte, len(h)+n)
	copy(buf, h)
	for i, b := range payload {
		buf[len(h)+i] = b ^ mask[i%4]
	}
	_, err := w.c.Write(buf)
	return err
}

func (w *conn) send(text []byte) error { return w.write(0x1, text) }

// read returns the next whole text or binary message, answering pings on the way.
func (w *conn) read() ([]byte, error) {
	var msg []byte
	for {
		var h [2]byte
		if _, err := io.ReadFull(w.r, h[:]); err != nil {
			return nil, err
		}
		fin, op := h[0]&0x80 != 0, h[0]&0x0f
		masked, n := h[1]&0x80 != 0, uint64(h[1]&0x7f)
		switch n {
		case 126:
			var b [2]byte
			if _, err := io.ReadFull(w.r, b[:]); err != nil {
				return nil, err
			}
			n = uint64(binary.BigEndian.Uint16(b[:]))
		case 127:
			var b [8]byte
			if _, err := io.ReadFull(w.r, b[:]); err != nil {
				return nil, err
			}
			n = binary.BigEndian.Uint64(b[:])
		}
		if n > 1<<30 {
			return nil, errors.New("cdp: message too large")
		}
		var mask [4]byte
		if masked {
			if _, err := io.ReadFull(w.r, mask[:]); err != nil {
				return nil, err
			}
		}
		p := make([]byte, n)
		if _, err := io.ReadFull(w.r, p); err != nil {
			return nil, err
		}
		if masked {
			for i := range p {
				p[i] ^= mask[i%4]
			}
		}
		switch op {
		case 0x8:
			w.write(0x8, nil)
			return nil, io.EOF
		case 0x9:
			w.write(0xA, p)
			continue
		case 0xA:
			continue
		}
		msg = append(msg, p...)
		if fin {
			return msg, nil
		}
	}
}

func (w *conn) close() error {
	w.write(0x8, nil)
	return w.c.Close()
}
