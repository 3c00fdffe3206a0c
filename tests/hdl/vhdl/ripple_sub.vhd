-- ripple_sub: W-bit two's-complement ripple-borrow subtractor a - b - cin (cin is a
-- borrow-in), built from full_subtractor cells in a generate loop; the VHDL-2008 twin of
-- ../ripple_sub.v with the same ports and flags:
--   y = (a - b - cin) mod 2^W; co = borrow out (1 = a borrow was needed);
--   ovf = borrow into the MSB xor borrow out of the MSB; zero = all result bits 0;
--   neg = result MSB.
library ieee;
use ieee.std_logic_1164.all;

entity ripple_sub is
    generic (
        W : natural := 16);
    port (
        a    : in  std_logic_vector(W - 1 downto 0);
        b    : in  std_logic_vector(W - 1 downto 0);
        cin  : in  std_logic;
        y    : out std_logic_vector(W - 1 downto 0);
        co   : out std_logic;
        ovf  : out std_logic;
        zero : out std_logic;
        neg  : out std_logic);
end entity ripple_sub;

architecture structural of ripple_sub is
    -- borrow(i) is the borrow into bit i; borrow(W) is the borrow out of the word.
    signal borrow : std_logic_vector(W downto 0);
    signal diff   : std_logic_vector(W - 1 downto 0);
begin
    assert W >= 1 report "ripple_sub needs W >= 1" severity failure;

    borrow(0) <= cin;

    g_bit : for i in 0 to W - 1 generate
        u_cell : entity work.full_subtractor
            port map (
                a    => a(i),
                b    => b(i),
                bin  => borrow(i),
                d    => diff(i),
                bout => borrow(i + 1));
    end generate g_bit;

    y    <= diff;
    co   <= borrow(W);
    ovf  <= borrow(W - 1) xor borrow(W);
    zero <= nor diff;  -- VHDL-2008 unary reduction operator
    neg  <= diff(W - 1);
end architecture structural;
