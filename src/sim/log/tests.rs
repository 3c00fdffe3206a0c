use super::*;
use std::io::{BufReader, Read};

/// A 16-bit subtractor with a borrow-in, named like a small DUT of ours.
const SPEC16: &str = r#"
name = "tank_level_delta"
operation = "sub"
width = 16
encoding = "twos"
[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
"#;

fn spec16() -> Spec {
    Spec::parse(SPEC16, "unit.toml").unwrap()
}

fn spec_of_width(width: u32) -> Spec {
    Spec::parse(
        &SPEC16.replace("width = 16", &format!("width = {width}")),
        "unit.toml",
    )
    .unwrap()
}

/// Shows a value digit by digit: in hex, `x` for a digit with every bit unknown and `?` for
/// one with some; in binary, `x` per unknown bit. A trailing `~z` marks high impedance.
fn show(v: &FieldValue, width: u32, binary: bool) -> String {
    let mut s = String::new();
    if binary {
        for i in (0..width).rev() {
            s.push(match (v.unknown.bit(i), v.bits.bit(i)) {
                (true, _) => 'x',
                (false, true) => '1',
                (false, false) => '0',
            });
        }
    } else {
        for d in (0..hex_digits(width)).rev() {
            let unknown = v.unknown.extract(d * 4, 4).low_u64();
            let in_field = Word::ones(width).extract(d * 4, 4).low_u64();
            s.push(if unknown == 0 {
                char::from_digit(v.bits.extract(d * 4, 4).low_u64() as u32, 16).unwrap()
            } else if unknown == in_field {
                'x'
            } else {
                '?'
            });
        }
    }
    if v.high_z {
        s.push_str("~z");
    }
    s
}

/// Reads every line of `text` and renders each outcome as one string:
/// `"<line>: index=<i> <port>=<value> .."` or `"<line>: ! <field>: <message>"`.
fn outcomes(text: &str, spec: &Spec, radix: Radix, binary: bool) -> Vec<String> {
    let mut reader = LogReader::new(text.as_bytes(), "run.log", spec, radix).unwrap();
    let mut row = LogRow::new();
    let mut out = Vec::new();
    loop {
        match reader.read_row(&mut row) {
            Ok(false) => break,
            Ok(true) => {
                let mut s = format!("{}:", row.line);
                if let Some(i) = row.index {
                    s.push_str(&format!(" index={i}"));
                }
                for &signal in reader.columns() {
                    let v = row.get(signal).unwrap();
                    let name = spec.ports.get(signal).unwrap();
                    s.push_str(&format!(
                        " {name}={}",
                        show(v, spec.signal_width(signal), binary)
                    ));
                }
                out.push(s);
            }
            Err(RowError::Line(p)) => out.push(format!(
                "{}: ! {}: {}",
                p.line.unwrap(),
                p.field.as_deref().unwrap_or("-"),
                p.message
            )),
            Err(RowError::Io(e)) => panic!("unexpected I/O error {e}"),
        }
    }
    out
}

fn header_problems(text: &str) -> Vec<String> {
    match LogReader::new(text.as_bytes(), "run.log", &spec16(), Radix::Hex) {
        Ok(_) => vec![],
        Err(e) => e.problems().iter().map(|p| p.to_string()).collect(),
    }
}

#[test]
fn signal_slots_follow_the_signal_list() {
    for (i, s) in Signal::ALL.iter().enumerate() {
        assert_eq!(slot(*s), i, "{s:?}");
    }
}

// Observed with Icarus Verilog 11.0 (`$fdisplay(fh, "%0d,%h,%h,%b,%h,%b", ...)`, the
// testbench is in tests/log_iverilog.rs, which also checks this exact text live). IEEE
// 1364-2005 17.1.1.3: a digit whose bits are all x prints `x`, all z `z`, some x `X`, some z
// (no x) `Z`. Row 3's a = 0000_0000_0zx0_1111 mixes z and x in one digit and prints `X`;
// its y = 0x05 with the second digit unknown prints `0x05`, which must not read as a prefix.
const ICARUS_HEX: &str = "index,a,b,cin,y,co
0,00ab,0001,0,00aa,0
1,xxxx,zzzz,x,12x4,z
2,00Xf,00Zf,1,z0z0,1
3,00Xf,ffff,0,0x05,0
";

// The same run with `%b` and blanks between fields.
const ICARUS_BIN: &str = "index a b cin y co
0 0000000010101011 0000000000000001 0 0000000010101010 0
1 xxxxxxxxxxxxxxxx zzzzzzzzzzzzzzzz x 00010010xxxx0100 z
2 000000000x101111 000000000z101111 1 zzzz0000zzzz0000 1
3 000000000zx01111 1111111111111111 0 0000xxxx00000101 0
";

// The same run with `%0d`: a wholly unknown value prints `x`/`z`, a partly unknown one
// `X`/`Z` (observed).
const ICARUS_DEC: &str = "index a b cin y co
0 171 1 0 170 0
1 x z x X z
2 X Z 1 Z 1
3 X 65535 0 X 0
";

#[test]
fn reads_icarus_hex_with_x_and_z_digits() {
    assert_eq!(
        outcomes(ICARUS_HEX, &spec16(), Radix::Hex, false),
        [
            "2: index=0 a=00ab b=0001 cin=0 y=00aa co=0",
            "3: index=1 a=xxxx b=xxxx~z cin=x y=12x4 co=x~z",
            "4: index=2 a=00xf b=00xf~z cin=1 y=x0x0~z co=1",
            "5: index=3 a=00xf b=ffff cin=0 y=0x05 co=0",
        ]
    );
}

#[test]
fn reads_icarus_binary_bit_by_bit() {
    assert_eq!(
        outcomes(ICARUS_BIN, &spec16(), Radix::Bin, true),
        [
            "2: index=0 a=0000000010101011 b=0000000000000001 cin=0 y=0000000010101010 co=0",
            "3: index=1 a=xxxxxxxxxxxxxxxx b=xxxxxxxxxxxxxxxx~z cin=x y=00010010xxxx0100 co=x~z",
            "4: index=2 a=000000000x101111 b=000000000x101111~z cin=1 y=xxxx0000xxxx0000~z co=1",
            "5: index=3 a=000000000xx01111~z b=1111111111111111 cin=0 y=0000xxxx00000101 co=0",
        ]
    );
}

#[test]
fn reads_icarus_decimal_with_whole_field_unknowns() {
    assert_eq!(
        outcomes(ICARUS_DEC, &spec16(), Radix::Dec, false),
        [
            "2: index=0 a=00ab b=0001 cin=0 y=00aa co=0",
            "3: index=1 a=xxxx b=xxxx~z cin=x y=xxxx co=x~z",
            "4: index=2 a=xxxx b=xxxx~z cin=1 y=xxxx~z co=1",
            "5: index=3 a=xxxx b=ffff cin=0 y=xxxx co=0",
        ]
    );
}

// Observed with GHDL 2.0.0 (VHDL-2008 `hwrite` for the vectors, `write` for the one-bit
// std_logic ports, no index column; the testbench is in tests/log_iverilog.rs). A nibble
// holding any of U X W - prints `X`, an all-Z nibble `Z`; L and H read as 0 and 1 and
// print as values in hex (`LHLH` -> 5).
const GHDL_HEX: &str = "a b cin y co
00AB 0001 0 00AA L
XXXX ZZZZ U 12X4 Z
00XF 0Z5F H Z0X0 -
00XF FFFF W 0X05 X
";

// The same run with `write` for every port: one std_logic character per bit.
const GHDL_BIN: &str = "a b cin y co
0000000010101011 0000000000000001 0 0000000010101010 L
UUUUUUUUUUUUUUUU ZZZZZZZZZZZZZZZZ U 0001001000XX0100 Z
000000000W101111 0000ZZZZLHLH1111 H ZZZZ0000----0000 -
00000000ZZZ-HHHH 1111111111111111 W 0000XXXX00000101 X
";

#[test]
fn reads_ghdl_uppercase_hex_and_std_logic_bits() {
    assert_eq!(
        outcomes(GHDL_HEX, &spec16(), Radix::Hex, false),
        [
            "2: a=00ab b=0001 cin=0 y=00aa co=0",
            "3: a=xxxx b=xxxx~z cin=x y=12x4 co=x~z",
            "4: a=00xf b=0x5f~z cin=1 y=x0x0~z co=x",
            "5: a=00xf b=ffff cin=x y=0x05 co=x",
        ]
    );
    assert_eq!(
        outcomes(GHDL_BIN, &spec16(), Radix::Bin, true),
        [
            "2: a=0000000010101011 b=0000000000000001 cin=0 y=0000000010101010 co=0",
            "3: a=xxxxxxxxxxxxxxxx b=xxxxxxxxxxxxxxxx~z cin=x y=0001001000xx0100 co=x~z",
            "4: a=000000000x101111 b=0000xxxx01011111~z cin=1 y=xxxx0000xxxx0000~z co=x",
            "5: a=00000000xxxx1111~z b=1111111111111111 cin=x y=0000xxxx00000101 co=x",
        ]
    );
}

/// Data-driven cases: a log, its radix, and every line's outcome.
struct Case {
    name: &'static str,
    radix: Radix,
    text: &'static str,
    expect: &'static [&'static str],
}

const CASES: &[Case] = &[
    Case {
        name: "comments, blank lines and CRLF everywhere",
        radix: Radix::Hex,
        text: "// produced by tb_tank\r\n\r\n   # another comment\r\nindex, a, b, cin, y, co\r\n\
               \r\n0 , 0001 , 0002 , 1 , fffe , 1\r\n  // mid-file comment\r\n\t\r\n1,0,0,0,0,0\r\n",
        expect: &[
            "6: index=0 a=0001 b=0002 cin=1 y=fffe co=1",
            "9: index=1 a=0000 b=0000 cin=0 y=0000 co=0",
        ],
    },
    Case {
        name: "blank-separated with tabs and runs of spaces, no final newline",
        radix: Radix::Hex,
        text: "index\ta  b\t\tcin y co\n  7\t00ff   0001 0\t00fe 0  \n8 1 2 1 3 0",
        expect: &[
            "2: index=7 a=00ff b=0001 cin=0 y=00fe co=0",
            "3: index=8 a=0001 b=0002 cin=1 y=0003 co=0",
        ],
    },
    Case {
        name: "underscores and prefixes",
        radix: Radix::Hex,
        text: "a,b,cin,y,co\n0x00_ab,0X0FF,0x1,ab_cd,0x0\n16'h00ab,'hff,1'b1,16'b1010_1010,'d1\n\
               8'hx,4'bz1,1'b0,16'o177777,1'bx\n",
        expect: &[
            "2: a=00ab b=00ff cin=1 y=abcd co=0",
            "3: a=00ab b=00ff cin=1 y=00aa co=1",
            "4: a=00xx b=000?~z cin=0 y=ffff co=x",
        ],
    },
    Case {
        name: "binary prefix and decimal forms",
        radix: Radix::Bin,
        text: "a b cin y co\n0b1111_0000 0B1 0 'hbeef 'd1\n",
        expect: &["2: a=0000000011110000 b=0000000000000001 cin=0 y=1011111011101111 co=1"],
    },
    Case {
        name: "decimal, negative two's complement and separators",
        radix: Radix::Dec,
        text: "a b cin y co\n65_535 -1 0 -32768 1\n0 -0 0 32767 0\n",
        expect: &[
            "2: a=ffff b=ffff cin=0 y=8000 co=1",
            "3: a=0000 b=0000 cin=0 y=7fff co=0",
        ],
    },
    Case {
        name: "columns in another order, inputs missing",
        radix: Radix::Hex,
        text: "co y index\n1 8000 41\n0 0001 42\n",
        expect: &["2: index=41 co=1 y=8000", "3: index=42 co=0 y=0001"],
    },
    Case {
        name: "bad lines are reported and reading goes on",
        radix: Radix::Hex,
        text: "index,a,b,cin,y,co\n0,1,2,0,3\n1,1,2,0,3,0,9\n2,1,2,0,3g,0\n3,1,2,0,1ffff,0\n\
               4,1,2,2,3,0\n+5,1,2,0,3,0\n6,1,,0,3,0\n7,1,2,0,0x,0\n8 1 2 0 3 0\n\
               18446744073709551616,1,2,0,3,0\n9,1,2,0,3,0\n",
        expect: &[
            "2: ! -: expected 6 fields, found 5",
            "3: ! -: expected 6 fields, found 7",
            "4: ! y: bad hex digit 'g' in column y",
            "5: ! y: value 1ffff does not fit in 16-bit column y",
            "6: ! cin: value 2 does not fit in 1-bit column cin",
            "7: ! index: bad index \"+5\" in column index: expected an unsigned decimal number",
            "8: ! b: empty value in column b",
            "9: ! y: value 0x in column y has no digits",
            "10: ! -: expected 6 fields, found 1 (the header is comma-separated, so every line must be)",
            "11: ! index: index 18446744073709551616 in column index is larger than 18446744073709551615",
            "12: index=9 a=0001 b=0002 cin=0 y=0003 co=0",
        ],
    },
    Case {
        name: "a bad value in a misaligned line reports the field count",
        radix: Radix::Hex,
        text: "a b cin y co\n1 2 q 0 3 0\n1,2,0,3,0\n",
        expect: &[
            "2: ! -: expected 5 fields, found 6",
            "3: ! -: expected 5 fields, found 1 (the header has no comma, so fields are separated by blanks)",
        ],
    },
    Case {
        name: "decimal errors",
        radix: Radix::Dec,
        text: "a b cin y co\n1x 0 0 0 0\n0 -32769 0 0 0\n0 0 0 65536 0\n0 0 0 0 a\n",
        expect: &[
            "2: ! a: bad decimal digit 'x' in column a (a decimal value can be unknown only as a whole: x or z)",
            "3: ! b: value -32769 is below the 16-bit two's-complement range (column b)",
            "4: ! y: value 65536 does not fit in 16-bit column y",
            "5: ! co: bad decimal digit 'a' in column co",
        ],
    },
    Case {
        name: "literal errors",
        radix: Radix::Hex,
        text: "a b cin y co\n4'hff 0 0 0 0\nq'h1 0 0 0 0\n0 'q1 0 0 0\n0 0 0 ' 0\n0 0 0 8'b1021 0\n",
        expect: &[
            "2: ! a: value 4'hff does not fit in its own 4-bit size (column a)",
            "3: ! a: bad size in value q'h1 in column a: expected a decimal bit count before '",
            "4: ! b: bad base 'q' in value 'q1 in column b: expected h, b, o or d after '",
            "5: ! y: bad base (none) in value ' in column y: expected h, b, o or d after '",
            "6: ! y: bad binary digit '2' in column y",
        ],
    },
    Case {
        name: "std_logic letters are binary digits only in the binary radix",
        radix: Radix::Hex,
        text: "a b cin y co\n00H0 0 0 0 0\n",
        expect: &["2: ! a: bad hex digit 'H' in column a"],
    },
];

#[test]
fn data_driven_cases() {
    let spec = spec16();
    for case in CASES {
        let binary = case.radix == Radix::Bin;
        assert_eq!(
            outcomes(case.text, &spec, case.radix, binary),
            case.expect,
            "case: {}",
            case.name
        );
    }
}

#[test]
fn prefix_ambiguity_follows_the_printed_width() {
    // For 16 bits `%h` prints 4 characters, so a 4-character "0x.." is digits.
    let mut v = FieldValue::default();
    parse_value(b"0x05", Radix::Hex, 16, &mut v).unwrap();
    assert_eq!(show(&v, 16, false), "0x05");
    parse_value(b"0x5", Radix::Hex, 16, &mut v).unwrap();
    assert_eq!(v, FieldValue::known(Word::from_u64(5)));
    parse_value(b"0x0005", Radix::Hex, 16, &mut v).unwrap();
    assert_eq!(v, FieldValue::known(Word::from_u64(5)));
    // For 8 bits `%h` prints 2 characters: "0x" is a known 0 and an unknown digit.
    parse_value(b"0x", Radix::Hex, 8, &mut v).unwrap();
    assert_eq!(show(&v, 8, false), "0x");
}

#[test]
fn unknown_digits_above_the_width_are_dropped() {
    // A 13-bit value prints as 4 hex digits; the top digit carries one bit.
    let mut v = FieldValue::default();
    parse_value(b"xfff", Radix::Hex, 13, &mut v).unwrap();
    assert_eq!(v.unknown, Word::bit_mask(12));
    assert_eq!(v.bits, Word::from_u64(0xfff));
    parse_value(b"1fff", Radix::Hex, 13, &mut v).unwrap();
    assert_eq!(v.bits, Word::from_u64(0x1fff));
    assert_eq!(
        parse_value(b"2fff", Radix::Hex, 13, &mut v),
        Err(ValueError::TooWide)
    );
}

#[test]
fn wide_fields_use_the_general_path() {
    let spec = spec_of_width(200);
    let text = format!(
        "a,b,cin,y,co\n{},{},0,{},1\n",
        "f".repeat(50),
        format_args!("1{}", "0".repeat(49)),
        format_args!("{}x{}", "0".repeat(10), "1".repeat(39)),
    );
    let mut reader = LogReader::new(text.as_bytes(), "wide.log", &spec, Radix::Hex).unwrap();
    let mut row = LogRow::new();
    assert!(reader.read_row(&mut row).unwrap());
    assert_eq!(row.get(Signal::A).unwrap().bits, Word::ones(200));
    assert_eq!(row.get(Signal::B).unwrap().bits, Word::bit_mask(196));
    let y = row.get(Signal::Result).unwrap();
    // The x is digit 39 from the right: bits 156..=159.
    assert_eq!(y.unknown, Word::ones(160).and(&Word::ones(156).not(160)));
    let mut ones_digits = Word::ZERO;
    for d in 0..39 {
        ones_digits.set_bit(4 * d, true);
    }
    assert_eq!(y.bits, ones_digits);
    assert!(!reader.read_row(&mut row).unwrap());
}

#[test]
fn header_problems_are_all_reported() {
    assert_eq!(
        header_problems("index,a,Y,a,carry\n"),
        [
            "run.log:1: Y: unknown column \"Y\": the spec's ports are a, b, cin, y, co (plus an \
             optional index column); column names are case-sensitive: did you mean \"y\"?",
            "run.log:1: a: column \"a\" appears twice in the header",
            "run.log:1: carry: unknown column \"carry\": the spec's ports are a, b, cin, y, co \
             (plus an optional index column)",
            "run.log:1: header: the header names none of the spec's outputs (y, co), so nothing \
             could be checked",
        ]
    );
    assert_eq!(
        header_problems("# first\n\n0 1 2 0 3 0\n"),
        [
            "run.log:3: 0: this line looks like data: the first line that is not a comment \
          must be a header row naming the columns (a, b, cin, y, co, optionally index)"
        ]
    );
    assert_eq!(
        header_problems("index,,y\n"),
        ["run.log:1: column 2: column 2 of the header has no name"]
    );
    assert_eq!(
        header_problems("index index y\n"),
        ["run.log:1: index: column \"index\" appears twice in the header"]
    );
}

#[test]
fn empty_and_comment_only_logs_have_no_header() {
    assert_eq!(
        header_problems(""),
        ["run.log: the log is empty: expected a header row naming the columns"]
    );
    assert_eq!(
        header_problems("// nothing ran\n\n  # really\n"),
        [
            "run.log: the log has only comments and blank lines: expected a header row naming \
          the columns"
        ]
    );
}

#[test]
fn byte_order_mark_and_accessors() {
    let text = "\u{feff}y\tindex\tco\n0001 3 1\n";
    let reader = LogReader::new(text.as_bytes(), "bom.log", &spec16(), Radix::Hex).unwrap();
    assert_eq!(reader.columns(), [Signal::Result, Signal::CarryOut]);
    assert!(reader.has_index());
    assert!(reader.has(Signal::Result));
    assert!(!reader.has(Signal::A));
    assert!(!reader.is_comma_separated());
    assert_eq!(reader.header_line(), 1);
    assert_eq!(reader.radix(), Radix::Hex);
    assert_eq!(reader.file(), "bom.log");
    let mut row = LogRow::new();
    let mut reader = reader;
    assert!(reader.read_row(&mut row).unwrap());
    assert_eq!(row.get(Signal::A), None);
    assert_eq!(row.index, Some(3));
    assert_eq!(reader.line(), 2);
}

#[test]
fn lines_split_across_small_buffers_read_the_same() {
    // A 7-byte buffer forces most lines through the copying path.
    let whole = outcomes(ICARUS_HEX, &spec16(), Radix::Hex, false);
    let mut reader = LogReader::new(
        BufReader::with_capacity(7, ICARUS_HEX.as_bytes()),
        "small.log",
        &spec16(),
        Radix::Hex,
    )
    .unwrap();
    let mut row = LogRow::new();
    let mut lines = Vec::new();
    while reader.read_row(&mut row).unwrap() {
        lines.push((row.line, row.index, *row.get(Signal::Result).unwrap()));
    }
    assert_eq!(lines.len(), whole.len());
    assert_eq!(lines[3].0, 5);
    assert_eq!(show(&lines[3].2, 16, false), "0x05");
    assert_eq!(lines[1].1, Some(1));
}

/// A source that yields `data` and then fails.
struct Failing<'a> {
    data: &'a [u8],
}

impl Read for Failing<'_> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.data.is_empty() {
            return Err(std::io::Error::other("device went away"));
        }
        let n = self.data.len().min(buf.len());
        buf[..n].copy_from_slice(&self.data[..n]);
        self.data = &self.data[n..];
        Ok(n)
    }
}

#[test]
fn io_errors_are_not_line_problems_and_end_the_reader() {
    let source = BufReader::new(Failing {
        data: b"y co\n0001 1\n0002",
    });
    let mut reader = LogReader::new(source, "dev.log", &spec16(), Radix::Hex).unwrap();
    let mut row = LogRow::new();
    assert!(reader.read_row(&mut row).unwrap());
    match reader.read_row(&mut row) {
        Err(RowError::Io(e)) => assert_eq!(e.to_string(), "dev.log: device went away"),
        other => panic!("expected an I/O error, got {other:?}"),
    }
    assert!(!reader.read_row(&mut row).unwrap());
}

#[test]
fn strict_callers_can_use_the_question_mark() {
    fn count(text: &str) -> Result<usize> {
        let mut reader = LogReader::new(text.as_bytes(), "q.log", &spec16(), Radix::Hex)?;
        let mut row = LogRow::new();
        let mut n = 0;
        while reader.read_row(&mut row)? {
            n += 1;
        }
        Ok(n)
    }
    assert_eq!(count("y\n1\n2\n").unwrap(), 2);
    let err = count("y\n1\nq\n").unwrap_err();
    assert_eq!(err.to_string(), "q.log:3: y: bad hex digit 'q' in column y");
}

#[test]
fn radix_names_round_trip() {
    for r in Radix::ALL {
        assert_eq!(r.name().parse::<Radix>(), Ok(r));
    }
    assert_eq!(Radix::default(), Radix::Hex);
    assert!("oct".parse::<Radix>().is_err());
}

#[test]
fn newline_search_matches_a_plain_scan() {
    let text = b"0123456789abcdef\n0123\n\n01234567\n";
    for start in 0..text.len() {
        let s = &text[start..];
        assert_eq!(
            find_newline(s),
            s.iter().position(|&b| b == b'\n'),
            "from {start}"
        );
    }
    assert_eq!(find_newline(b"no newline at all here"), None);
}

#[test]
fn fast_path_takes_plain_lines_and_leaves_the_rest() {
    let spec = spec16();
    let comma = parse_header(b"index,a,b,cin,y,co", "f.log", 1, &spec, Radix::Hex).unwrap();
    let blank = parse_header(b"index a b cin y co", "f.log", 1, &spec, Radix::Hex).unwrap();
    let mut row = LogRow::new();
    for line in [
        "0,00ab,0001,0,00aa,0",
        " 12 , ffff,0 ,1,  8000 ,1  ",
        "7,A,b,1,C,0",
    ] {
        assert!(comma.parse_plain_line(line.as_bytes(), &mut row), "{line}");
    }
    assert!(blank.parse_plain_line(b"3\t00ab  0001 0 00aa 0 ", &mut row));
    assert_eq!(row.index, Some(3));
    assert_eq!(
        row.values[slot(Signal::A)],
        FieldValue::known(Word::from_u64(0xab))
    );
    for line in [
        "0,0x05,0001,0,00aa,0",  // a prefix (or an unknown digit)
        "0,00ab,0001,0,00aa",    // too few fields
        "0,00ab,0001,0,00aa,0,", // a trailing comma
        "0,00ab,0001,2,00aa,0",  // too wide for cin
        "0,1ffff,0001,0,00aa,0", // too wide for a
        "0,00_ab,0001,0,00aa,0", // a separator
        "0,00ab,0001,0,00aa,z",  // an unknown
        "0,00ab,0001,0,00 aa,0", // a blank inside a field
        "+0,00ab,0001,0,00aa,0", // a signed index
    ] {
        assert!(!comma.parse_plain_line(line.as_bytes(), &mut row), "{line}");
    }
    assert!(!blank.parse_plain_line(b"0,00ab 0001 0 00aa 0", &mut row));
    // The decimal index stops at 'a'; without a blank that is not a field boundary.
    assert!(!blank.parse_plain_line(b"12ab 0001 0 00aa 0", &mut row));
}

mod fast_path {
    use super::*;
    use proptest::prelude::*;

    /// One generated field: a value, how to write it, and now and then an odd token.
    type FieldSpec = (u64, usize, bool, u8, String, String);

    fn field() -> impl Strategy<Value = FieldSpec> {
        (
            any::<u64>(),
            0usize..3,
            any::<bool>(),
            any::<u8>(),
            "[ \t]{0,2}",
            "[ \t]{0,2}",
        )
    }

    const ODD: [&str; 10] = ["0x5", "x", "1_0", "Z", "'h1", "-1", "", "0b1", "U", "+1"];

    /// A line for `columns` columns of `widths` (None for the index) in `radix`.
    fn build(
        widths: &[Option<u32>],
        radix: Radix,
        comma: bool,
        fields: &[FieldSpec],
        count_change: i8,
    ) -> String {
        let mut text = String::new();
        let n = (widths.len() as isize + count_change as isize).max(1) as usize;
        for i in 0..n {
            let (value, zeros, upper, odd, before, after) = &fields[i % fields.len()];
            let width = widths.get(i).copied().flatten();
            let token = if odd % 16 == 0 {
                ODD[*odd as usize / 16 % ODD.len()].to_string()
            } else {
                // Mostly in range; sometimes one bit too many.
                let bits = width.unwrap_or(64).min(64) + (odd % 8 == 1) as u32;
                let v = if bits >= 64 {
                    *value
                } else {
                    value & ((1 << bits) - 1)
                };
                let digits = match (width, radix) {
                    (None, _) | (_, Radix::Dec) => v.to_string(),
                    (_, Radix::Hex) if *upper => format!("{v:X}"),
                    (_, Radix::Hex) => format!("{v:x}"),
                    _ => format!("{v:b}"),
                };
                format!("{}{digits}", "0".repeat(*zeros))
            };
            if i > 0 {
                text.push_str(if comma { "," } else { " " });
            }
            text.push_str(before);
            text.push_str(&token);
            text.push_str(after);
        }
        text
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(3000))]

        /// Whatever the fast path accepts, the general path accepts with the same values.
        #[test]
        fn fast_path_agrees_with_the_general_path(
            fields in proptest::collection::vec(field(), 6),
            comma in any::<bool>(),
            count_change in prop_oneof![8 => Just(0i8), 1 => Just(-1), 1 => Just(1)],
            radix in prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)],
            width in prop_oneof![Just(1u32), Just(16), Just(32), Just(64), Just(70)],
            with_index in any::<bool>(),
        ) {
            let spec = spec_of_width(width);
            let mut names = vec!["a", "b", "cin", "y", "co"];
            let mut widths = vec![Some(width), Some(width), Some(1), Some(width), Some(1)];
            if with_index {
                names.insert(0, "index");
                widths.insert(0, None);
            }
            let header = names.join(if comma { "," } else { " " });
            let format = parse_header(header.as_bytes(), "p.log", 1, &spec, radix).unwrap();
            let text = build(&widths, radix, comma, &fields, count_change);
            let mut fast = LogRow::new();
            let mut general = LogRow::new();
            let result = format.parse_fields(text.as_bytes(), 2, "p.log", &mut general);
            if format.parse_plain_line(text.as_bytes(), &mut fast) {
                prop_assert!(result.is_ok(), "{:?} refused {:?}", text, result);
                prop_assert_eq!(fast.index, general.index, "{:?}", text);
                for s in [Signal::A, Signal::B, Signal::CarryIn, Signal::Result, Signal::CarryOut] {
                    prop_assert_eq!(fast.values[slot(s)], general.values[slot(s)], "{:?}", text);
                }
            } else if result.is_ok() {
                // Only forms outside the plain ones may leave the fast path: an odd
                // token, or more digits than a u64 loop takes (the index is decimal).
                let odd = fields.iter().any(|f| f.3 % 16 == 0);
                let limit = match radix {
                    Radix::Hex => 16,
                    Radix::Bin => 64,
                    Radix::Dec => 19,
                };
                let long = text
                    .split([',', ' ', '\t'])
                    .filter(|t| !t.is_empty())
                    .enumerate()
                    .any(|(i, t)| t.len() > if with_index && i == 0 { 19 } else { limit });
                prop_assert!(odd || long, "plain line {:?} left the fast path", text);
            }
        }

        #[test]
        fn hex8_matches_the_byte_loop(chunk in proptest::array::uniform8(prop_oneof![
            4 => proptest::sample::select(b"0123456789abcdefABCDEF".to_vec()),
            1 => proptest::sample::select(b"/:@G`gxX_, \t".to_vec()),
            1 => any::<u8>(),
        ])) {
            let mut value = 0u64;
            let mut count = 0;
            for &c in &chunk {
                let d = HEX_VALUE[c as usize];
                if d > 15 {
                    break;
                }
                value = value << 4 | d as u64;
                count += 1;
            }
            prop_assert_eq!(hex8(chunk), (value, count), "{:?}", chunk);
        }
    }
}

mod round_trip {
    use super::*;
    use proptest::prelude::*;

    /// How a test value is written out.
    #[derive(Debug, Clone)]
    struct Style {
        radix: Radix,
        full_width: bool,
        prefix: bool,
        literal: bool,
        upper: bool,
        separators: Vec<usize>,
    }

    fn style() -> impl Strategy<Value = Style> {
        (
            prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)],
            any::<bool>(),
            any::<bool>(),
            any::<bool>(),
            any::<bool>(),
            proptest::collection::vec(0usize..200, 0..4),
        )
            .prop_map(
                |(radix, full_width, prefix, literal, upper, separators)| Style {
                    radix,
                    full_width,
                    prefix,
                    literal,
                    upper,
                    separators,
                },
            )
    }

    /// Writes `bits` (with unknown digits where `unknown_digits` says, hex and binary
    /// only) in `style`, and returns the text with the value the reader should produce.
    fn format(bits: Word, unknown_digits: u128, width: u32, style: &Style) -> (String, FieldValue) {
        let per_digit = match style.radix {
            Radix::Hex => 4,
            _ => 1,
        };
        let digits_needed = width.div_ceil(per_digit);
        let mut expect_unknown = Word::ZERO;
        let mut expect_z = Word::ZERO;
        let mut digits: Vec<u8> = Vec::new();
        if style.radix == Radix::Dec {
            digits.extend(bits.to_decimal().bytes());
            if style.full_width {
                let full = Word::ones(width).to_decimal().len();
                while digits.len() < full {
                    digits.insert(0, b'0');
                }
            }
        } else {
            for d in (0..digits_needed).rev() {
                // Digits above bit 127 stay known to keep the unknown mask a u128.
                let unknown = d < 128 && unknown_digits >> d & 1 == 1;
                let value = bits.extract(d * per_digit, per_digit).low_u64() as u32;
                if unknown {
                    let digit = b"xXzZ"[(value % 4) as usize];
                    for i in 0..per_digit {
                        if d * per_digit + i < width {
                            expect_unknown.set_bit(d * per_digit + i, true);
                            if digit | 0x20 == b'z' {
                                expect_z.set_bit(d * per_digit + i, true);
                            }
                        }
                    }
                    digits.push(digit);
                } else {
                    let c = char::from_digit(value, 16).unwrap();
                    let c = if style.upper {
                        c.to_ascii_uppercase()
                    } else {
                        c
                    };
                    digits.push(c as u8);
                }
            }
            if !style.full_width {
                // Drop leading known zeros, keeping at least one digit.
                while digits.len() > 1 && digits[0] == b'0' {
                    digits.remove(0);
                }
            }
        }
        // An all-unknown single digit means "every bit unknown" in a plain value.
        if digits.len() == 1 && matches!(digits[0], b'x' | b'X' | b'z' | b'Z') {
            expect_unknown = Word::ones(width);
            if digits[0] | 0x20 == b'z' {
                expect_z = Word::ones(width);
            }
        }
        // A leading "0x" digit pair is read as digits only at the exact printed length, so
        // separators there would turn it into a prefix (documented); keep such tokens bare.
        let digit_pair = digits.len() >= 2 && digits[0] == b'0' && digits[1] | 0x20 == b'x';
        for &at in &style.separators {
            if digits.len() > 1 && !digit_pair {
                let at = 1 + at % (digits.len() - 1);
                digits.insert(at, b'_');
            }
        }
        let mut text = String::from_utf8(digits).unwrap();
        if style.literal && !text.starts_with(['x', 'X', 'z', 'Z']) {
            let base = match style.radix {
                Radix::Hex => 'h',
                Radix::Bin => 'b',
                _ => 'd',
            };
            text = format!("{width}'{base}{text}");
        } else if style.prefix {
            match style.radix {
                Radix::Hex => {
                    text = format!("0x{text}");
                    // Keep clear of the length at which "0x" reads as digits; a
                    // separator changes the length but not the digits.
                    if text.len() == hex_digits(width) as usize {
                        text.insert(2, '_');
                    }
                }
                Radix::Bin => text = format!("0b{text}"),
                _ => {}
            }
        }
        let bits = bits.and(&expect_unknown.not(MAX_WIDTH));
        let high_z = !expect_unknown.is_zero() && text.contains(['z', 'Z']);
        (
            text,
            FieldValue {
                bits,
                unknown: expect_unknown,
                high_z,
                z: expect_z,
            },
        )
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(2000))]

        #[test]
        fn formatted_values_parse_back(
            width in prop_oneof![1u32..=70, 1u32..=512],
            limbs in any::<[u64; LIMBS]>(),
            unknown_digits in any::<u128>(),
            with_unknowns in any::<bool>(),
            style in style(),
        ) {
            let bits = Word::from_limbs(limbs).masked(width);
            let unknown_digits = if with_unknowns && style.radix != Radix::Dec {
                unknown_digits
            } else {
                0
            };
            let (text, expect) = format(bits, unknown_digits, width, &style);
            let mut got = FieldValue::default();
            let result = parse_value(text.as_bytes(), style.radix, width, &mut got);
            prop_assert_eq!(result, Ok(()), "text {}", text);
            prop_assert_eq!(got, expect, "text {}", text);
        }

        #[test]
        fn one_bit_too_many_is_refused(width in 1u32..=511, radix in prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)]) {
            let too_big = Word::bit_mask(width);
            let text = match radix {
                Radix::Hex => too_big.to_hex(width + 1),
                Radix::Bin => too_big.to_bin(width + 1),
                _ => too_big.to_decimal(),
            };
            let mut got = FieldValue::default();
            prop_assert_eq!(parse_value(text.as_bytes(), radix, width, &mut got), Err(ValueError::TooWide));
        }
    }
}
