-- full_adder: one-bit full-adder cell (VHDL twin of ../full_adder.v).
-- Textbook equations (common practice, no source): s = a xor b xor cin,
-- cout = (a and b) or (cin and (a xor b)).
library ieee;
use ieee.std_logic_1164.all;

entity full_adder is
    port (
        a    : in  std_logic;
        b    : in  std_logic;
        cin  : in  std_logic;
        s    : out std_logic;
        cout : out std_logic);
end entity full_adder;

architecture dataflow of full_adder is
    signal propagate : std_logic;
begin
    propagate <= a xor b;
    s         <= propagate xor cin;
    cout      <= (a and b) or (cin and propagate);
end architecture dataflow;
