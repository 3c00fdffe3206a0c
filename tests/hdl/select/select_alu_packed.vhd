-- select_alu_packed: the VHDL-2008 twin of select_alu_packed.v (invented unit): the select
-- ALU of select_alu.vhd with its arithmetic flags packed as nzcv = (n, z, co, v), bit 0
-- overflow, bit 1 carry out, bit 2 zero (active low), bit 3 negative; lt, eq, gt separate.
-- BUG = 1 inverts the zero flag's polarity; BUG = 2 swaps the carry and overflow bits.
library ieee;
use ieee.std_logic_1164.all;

entity select_alu_packed is
    generic (
        W   : natural := 8;
        BUG : natural := 0);
    port (
        a    : in  std_logic_vector(W - 1 downto 0);
        b    : in  std_logic_vector(W - 1 downto 0);
        op   : in  std_logic_vector(3 downto 0);
        rd   : out std_logic_vector(W - 1 downto 0);
        nzcv : out std_logic_vector(3 downto 0);
        lt   : out std_logic;
        eq   : out std_logic;
        gt   : out std_logic);
end entity select_alu_packed;

architecture structural of select_alu_packed is
    signal co, v, z, n : std_logic;
    function zero_bug(bug : natural) return natural is
    begin
        if bug = 1 then return 1; else return 0; end if;
    end function;
begin
    alu : entity work.select_alu
        generic map (W => W, ZERO_ACTIVE_LOW => 1, BUG => zero_bug(BUG))
        port map (a => a, b => b, op => op, rd => rd, co => co, v => v, z => z, n => n,
                  lt => lt, eq => eq, gt => gt);
    nzcv <= n & z & v & co when BUG = 2 else n & z & co & v;
end architecture structural;
